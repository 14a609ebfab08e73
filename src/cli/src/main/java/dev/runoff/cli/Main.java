package dev.runoff.cli;

import picocli.CommandLine;
import picocli.CommandLine.Command;
import picocli.CommandLine.Model.CommandSpec;
import picocli.CommandLine.ParameterException;
import picocli.CommandLine.Spec;

/**
 * The {@code runoff} program. Each command is a picocli subcommand listed in {@code subcommands}; adding a
 * command is one line there. Exit codes: 0 on success, 2 for bad arguments (one line on standard error, no
 * usage dump), 1 for an internal error.
 */
@Command(name = "runoff", mixinStandardHelpOptions = true, versionProvider = VersionInfo.class,
        description = "Adaptive best-arm experiments: posteriors, top-two allocation, stopping and audit.",
        exitCodeListHeading = ExitCodes.HEADING,
        exitCodeList = {"0:success (each command lists its own exit codes)",
            "1:internal error",
            "2:bad arguments or missing command"},
        subcommands = {
            EvaluateCommand.class,
            DemoCommand.class,
            RunCommand.class,
            TopicsCommand.class,
            ExperimentCommand.class,
            PlanCommand.class,
            AuditCommand.class,
        })
public final class Main implements Runnable {

    @Spec
    private CommandSpec spec;

    /** Runs the program and exits with its exit code. */
    public static void main(String[] args) {
        System.exit(commandLine().execute(args));
    }

    /** The program's command line with its error handlers, for {@link #main} and in-process tests. */
    public static CommandLine commandLine() {
        OneLineErrors errors = new OneLineErrors();
        return new CommandLine(new Main())
                .setParameterExceptionHandler(errors)
                .setExecutionExceptionHandler(errors);
    }

    /** Without a command there is nothing to do: a usage error. */
    @Override
    public void run() {
        throw new ParameterException(spec.commandLine(), "missing command (try 'runoff --help')");
    }
}
