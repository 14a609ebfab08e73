package dev.runoff.broker;

import java.net.BindException;

/**
 * A listener port could not be bound, found either by probing the port before the broker starts or
 * as a {@link BindException} in the cause chain of a failed start.
 */
final class BindFailure extends Exception {
    private static final long serialVersionUID = 1L;

    /**
     * Creates the failure.
     *
     * @param address the listener and address that could not be bound, e.g. {@code CONTROLLER 127.0.0.1:9093}
     * @param cause the underlying exception
     */
    BindFailure(String address, Throwable cause) {
        super("could not bind " + address + ": " + detail(cause), cause);
    }

    /**
     * Tells whether {@code failure} or one of its causes is a {@link BindException}, which is how a
     * listener on a port taken by another socket surfaces from the broker's socket server.
     */
    static boolean isCauseOf(Throwable failure) {
        return bindException(failure) != null;
    }

    /**
     * The most telling message: that of the exception wrapping the {@link BindException} (Kafka's
     * "Socket server failed to bind to host:port: ..." names the port), else the failure's own.
     */
    private static String detail(Throwable failure) {
        Throwable wrapper = failure;
        for (Throwable t = failure; t != null && t.getCause() != t; t = t.getCause()) {
            if (t.getCause() instanceof BindException) {
                wrapper = t;
            }
        }
        return wrapper.getMessage();
    }

    private static BindException bindException(Throwable failure) {
        for (Throwable t = failure; t != null && t.getCause() != t; t = t.getCause()) {
            if (t instanceof BindException bind) {
                return bind;
            }
        }
        return null;
    }
}
