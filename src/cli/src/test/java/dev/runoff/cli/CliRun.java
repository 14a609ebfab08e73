package dev.runoff.cli;

import java.io.PrintWriter;
import java.io.StringWriter;
import picocli.CommandLine;

/**
 * One in-process run of a command with captured output.
 *
 * @param exitCode the exit code
 * @param out      standard output
 * @param err      standard error
 */
record CliRun(int exitCode, String out, String err) {

    /** Runs {@code args} through {@code Main}'s command line. */
    static CliRun of(String... args) {
        return of(Main.commandLine(), args);
    }

    /** Runs {@code args} through {@code commandLine} (with Main's error handlers). */
    static CliRun of(CommandLine commandLine, String... args) {
        StringWriter out = new StringWriter();
        StringWriter err = new StringWriter();
        OneLineErrors errors = new OneLineErrors();
        int code = commandLine.setOut(new PrintWriter(out)).setErr(new PrintWriter(err))
                .setParameterExceptionHandler(errors).setExecutionExceptionHandler(errors).execute(args);
        return new CliRun(code, out.toString(), err.toString());
    }
}
