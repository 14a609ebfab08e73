package dev.runoff.cli;

/** The heading of every command's exit code list, so each help text states its exit codes the same way. */
final class ExitCodes {
    /** Heading of the exit code list in the help. */
    static final String HEADING = "%nExit codes:%n";

    private ExitCodes() {
    }
}
