package dev.runoff.chaos;

import dev.runoff.cli.Main;
import java.io.PrintWriter;
import java.io.StringWriter;

/**
 * One in-process run of the {@code runoff} command line.
 *
 * @param exitCode its exit code
 * @param out      standard output
 * @param err      standard error
 */
record Cli(int exitCode, String out, String err) {

    static Cli run(String... args) {
        StringWriter out = new StringWriter();
        StringWriter err = new StringWriter();
        int code = Main.commandLine().setOut(new PrintWriter(out)).setErr(new PrintWriter(err)).execute(args);
        return new Cli(code, out.toString(), err.toString());
    }
}
