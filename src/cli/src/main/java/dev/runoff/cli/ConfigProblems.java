package dev.runoff.cli;

import dev.runoff.job.InvalidConfigException;
import java.io.PrintWriter;
import picocli.CommandLine.Model.CommandSpec;

/**
 * Prints every configuration problem, one line each, and gives the usage exit code; prints a failure to reach
 * or use the cluster as one line with exit code 1.
 */
final class ConfigProblems {

    private ConfigProblems() {
    }

    /** Prints {@code e}'s problems as {@code <command>: <problem>} lines; returns exit code 2. */
    static int print(CommandSpec spec, InvalidConfigException e) {
        PrintWriter err = spec.commandLine().getErr();
        String name = spec.qualifiedName();
        e.problems().forEach(p -> err.println(name + ": " + p));
        err.println(name + ": " + e.problems().size() + (e.problems().size() == 1 ? " problem" : " problems")
                + " in the configuration; nothing was started");
        err.flush();
        return OneLineErrors.USAGE;
    }

    /** Prints {@code e}'s message as {@code <command>: <message>}; returns exit code 1. */
    static int failure(CommandSpec spec, RuntimeException e) {
        PrintWriter err = spec.commandLine().getErr();
        err.println(spec.qualifiedName() + ": " + e.getMessage());
        err.flush();
        return OneLineErrors.INTERNAL;
    }
}
