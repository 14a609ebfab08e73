package dev.runoff.job;

import java.util.ArrayDeque;
import java.util.Deque;
import java.util.function.Consumer;
import java.util.function.LongSupplier;
import org.apache.kafka.streams.errors.StreamsUncaughtExceptionHandler;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;

/**
 * Logs why a stream thread died, counts it, and asks Kafka Streams to replace the thread
 * ({@code REPLACE_THREAD}): the tasks move to the new thread and resume from their last commit, so under
 * exactly-once nothing is lost or counted twice.
 *
 * <p>A failure that repeats on the same record would repeat the replacement for ever while the process looks
 * alive. So at most {@code maxReplacements} replacements are allowed within a sliding window of
 * {@code windowMs}; the next failure within the window shuts the client down ({@code SHUTDOWN_CLIENT}: the
 * client ends in ERROR, {@code /health} answers DOWN with the cause, and the run command exits non-zero, so
 * the orchestrator restarts the pod or someone looks at the cause).
 */
final class ReplaceThreadHandler implements StreamsUncaughtExceptionHandler {

    private static final Logger LOG = LoggerFactory.getLogger(ReplaceThreadHandler.class);

    private final int maxReplacements;
    private final long windowMs;
    private final LongSupplier clock;
    private final Runnable onReplace;
    private final Consumer<String> onGiveUp;
    private final Deque<Long> recent = new ArrayDeque<>();

    /**
     * A handler that replaces at most {@code maxReplacements} threads within any {@code windowMs}.
     *
     * @param clock     milliseconds, for the window
     * @param onReplace run each time a thread is replaced (e.g. a counter)
     * @param onGiveUp  receives the cause when the limit is exceeded and the client is shut down
     */
    ReplaceThreadHandler(int maxReplacements, long windowMs, LongSupplier clock, Runnable onReplace,
                         Consumer<String> onGiveUp) {
        this.maxReplacements = maxReplacements;
        this.windowMs = windowMs;
        this.clock = clock;
        this.onReplace = onReplace;
        this.onGiveUp = onGiveUp;
    }

    @Override
    public synchronized StreamThreadExceptionResponse handle(Throwable exception) {
        long now = clock.getAsLong();
        while (!recent.isEmpty() && now - recent.peekFirst() >= windowMs) {
            recent.removeFirst();
        }
        if (recent.size() >= maxReplacements) {
            String cause = "stream thread failed " + (recent.size() + 1) + " times within " + windowMs + " ms: "
                    + root(exception);
            LOG.error("event=stream-thread-failed thread={} cause=\"{}\" root=\"{}\" action=shutdown-client "
                    + "replacements={} window.ms={}", Thread.currentThread().getName(), exception, root(exception),
                    recent.size(), windowMs, exception);
            onGiveUp.accept(cause);
            return StreamThreadExceptionResponse.SHUTDOWN_CLIENT;
        }
        recent.addLast(now);
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
