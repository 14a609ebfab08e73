package dev.runoff.cli;

import java.io.PrintWriter;
import org.apache.kafka.common.errors.TimeoutException;
import picocli.CommandLine;
import picocli.CommandLine.IExecutionExceptionHandler;
import picocli.CommandLine.IParameterExceptionHandler;
import picocli.CommandLine.ParameterException;
import picocli.CommandLine.ParseResult;

/**
 * Reports bad arguments as one line on standard error, {@code <command>: <message>}, with exit code 2 and
 * no usage dump. A cluster that did not answer in time (a Kafka {@code TimeoutException} anywhere in the
 * cause chain) is one line too, with exit code 1. Any other failure is an internal error: a line plus its
 * stack trace, exit code 1.
 */
final class OneLineErrors implements IParameterExceptionHandler, IExecutionExceptionHandler {
    /** Exit code for bad arguments. */
    static final int USAGE = 2;
    /** Exit code for internal errors. */
    static final int INTERNAL = 1;

    @Override
    public int handleParseException(ParameterException ex, String[] args) {
        return usage(ex.getCommandLine(), ex.getMessage());
    }

    @Override
    public int handleExecutionException(Exception ex, CommandLine cmd, ParseResult parseResult) {
        if (ex instanceof IllegalArgumentException) {
            return usage(cmd, ex.getMessage());
        }
        PrintWriter err = cmd.getErr();
        TimeoutException timeout = timeoutIn(ex);
        if (timeout != null) {
            err.println(cmd.getCommandSpec().qualifiedName() + ": no broker answered in time (" + timeout.getMessage()
                    + "); check --bootstrap-server and the cluster");
            err.flush();
            return INTERNAL;
        }
        err.println(cmd.getCommandSpec().qualifiedName() + ": internal error: " + ex);
        ex.printStackTrace(err);
        err.flush();
        return INTERNAL;
    }

    private static TimeoutException timeoutIn(Throwable ex) {
        for (Throwable t = ex; t != null; t = t.getCause()) {
            if (t instanceof TimeoutException timeout) {
                return timeout;
            }
        }
        return null;
    }

    private static int usage(CommandLine cmd, String message) {
        PrintWriter err = cmd.getErr();
        String line = String.valueOf(message).replaceAll("\\s*\\R\\s*", " ").trim();
        err.println(cmd.getCommandSpec().qualifiedName() + ": " + line);
        err.flush();
        return USAGE;
    }
}
