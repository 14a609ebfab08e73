package dev.runoff.job;

import static org.junit.jupiter.api.Assertions.assertEquals;

import java.util.concurrent.atomic.AtomicInteger;
import org.apache.kafka.streams.errors.StreamsUncaughtExceptionHandler.StreamThreadExceptionResponse;
import org.junit.jupiter.api.Test;

/** The job's answer to a stream thread that died. */
class ReplaceThreadHandlerTest {

    @Test
    void everyFailureReplacesTheThreadAndIsCounted() {
        AtomicInteger replaced = new AtomicInteger();
        ReplaceThreadHandler handler = new ReplaceThreadHandler(replaced::incrementAndGet);
        assertEquals(StreamThreadExceptionResponse.REPLACE_THREAD,
                handler.handle(new IllegalStateException("outer", new ArithmeticException("root"))));
        assertEquals(StreamThreadExceptionResponse.REPLACE_THREAD, handler.handle(new OutOfMemoryError("heap")));
        assertEquals(2, replaced.get());
    }
}
