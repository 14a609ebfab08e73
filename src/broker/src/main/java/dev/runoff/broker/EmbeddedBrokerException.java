package dev.runoff.broker;

/** The embedded broker could not format, start, stop or answer a request; the message names the problem. */
public final class EmbeddedBrokerException extends RuntimeException {
    private static final long serialVersionUID = 1L;

    /**
     * Creates the exception.
     *
     * @param message what went wrong, naming the directory, port or topic involved
     * @param cause the underlying failure, or {@code null}
     */
    public EmbeddedBrokerException(String message, Throwable cause) {
        super(message, cause);
    }
}
