package dev.runoff.job;

import org.apache.kafka.streams.errors.StreamsUncaughtExceptionHandler;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;

/**
 * Logs why a stream thread died, counts it, and asks Kafka Streams to replace the thread
 * ({@code REPLACE_THREAD}): the tasks move to the new thread and resume from their last commit, so under
 * exactly-once nothing is lost or counted twice. A failure that repeats on the same record repeats the
 * replacement; the counter and the log show it.
 */
final class ReplaceThreadHandler implements StreamsUncaughtExceptionHandler {

    private static final Logger LOG = LoggerFactory.getLogger(ReplaceThreadHandler.class);

    private final Runnable onReplace;

    /** A handler that runs {@code onReplace} (e.g. a counter) each time it replaces a thread. */
    ReplaceThreadHandler(Runnable onReplace) {
        this.onReplace = onReplace;
    }

    @Override
    public StreamThreadExceptionResponse handle(Throwable exception) {
        onReplace.run();
        LOG.error("event=stream-thread-failed thread={} cause=\"{}\" root=\"{}\" action=replace-thread",
                Thread.currentThread().getName(), exception, root(exception), exception);
        return StreamThreadExceptionResponse.REPLACE_THREAD;
    }

    private static Throwable root(Throwable exception) {
        Throwable t = exception;
        while (t.getCause() != null && t.getCause() != t) {
            t = t.getCause();
        }
        return t;
    }
}
