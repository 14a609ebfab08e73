package dev.runoff.client;

/**
 * Thrown by {@link ControlTopicFollower.Builder#start()} when the follower has not read the control topic up
 * to the end offsets it saw at start within the start-up timeout. The follower is closed when this is thrown.
 */
public final class CatchUpTimeoutException extends RuntimeException {
    private static final long serialVersionUID = 1L;

    /** An exception with the given message and cause (the last error seen, may be null). */
    public CatchUpTimeoutException(String message, Throwable cause) {
        super(message, cause);
    }
}
