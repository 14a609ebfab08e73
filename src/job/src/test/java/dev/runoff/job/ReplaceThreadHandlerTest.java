package dev.runoff.job;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.concurrent.atomic.AtomicInteger;
import java.util.concurrent.atomic.AtomicLong;
import java.util.concurrent.atomic.AtomicReference;
import org.apache.kafka.streams.errors.StreamsUncaughtExceptionHandler.StreamThreadExceptionResponse;
import org.junit.jupiter.api.Test;

/** The job's answer to a stream thread that died. */
class ReplaceThreadHandlerTest {

    private final AtomicLong clock = new AtomicLong(1_000);
    private final AtomicInteger replaced = new AtomicInteger();
    private final AtomicReference<String> gaveUp = new AtomicReference<>();

    private ReplaceThreadHandler handler(int max, long windowMs) {
        return new ReplaceThreadHandler(max, windowMs, clock::get, replaced::incrementAndGet, gaveUp::set);
    }

    @Test
    void failuresWithinTheLimitReplaceTheThreadAndAreCounted() {
        ReplaceThreadHandler handler = handler(2, 60_000);
        assertEquals(StreamThreadExceptionResponse.REPLACE_THREAD,
                handler.handle(new IllegalStateException("outer", new ArithmeticException("root"))));
        assertEquals(StreamThreadExceptionResponse.REPLACE_THREAD, handler.handle(new OutOfMemoryError("heap")));
        assertEquals(2, replaced.get());
        assertNull(gaveUp.get());
    }

    @Test
    void oneFailureBeyondTheLimitWithinTheWindowShutsTheClientDownWithTheCause() {
        ReplaceThreadHandler handler = handler(2, 60_000);
        handler.handle(new IllegalStateException("first"));
        clock.addAndGet(59_000);
        handler.handle(new IllegalStateException("second"));
        assertEquals(StreamThreadExceptionResponse.SHUTDOWN_CLIENT,
                handler.handle(new IllegalStateException("outer", new ArithmeticException("poison"))));
        assertEquals(2, replaced.get());
        assertTrue(gaveUp.get().contains("3 times within 60000 ms")
                && gaveUp.get().contains("ArithmeticException: poison"), gaveUp.get());
    }

    @Test
    void failuresOlderThanTheWindowNoLongerCount() {
        ReplaceThreadHandler handler = handler(2, 60_000);
        handler.handle(new IllegalStateException("first"));
        handler.handle(new IllegalStateException("second"));
        clock.addAndGet(60_000);
        assertEquals(StreamThreadExceptionResponse.REPLACE_THREAD, handler.handle(new IllegalStateException("third")));
        assertNull(gaveUp.get());
    }

    @Test
    void aLimitOfZeroShutsDownAtTheFirstFailure() {
        assertEquals(StreamThreadExceptionResponse.SHUTDOWN_CLIENT, handler(0, 1).handle(new IllegalStateException()));
        assertEquals(0, replaced.get());
    }
}
