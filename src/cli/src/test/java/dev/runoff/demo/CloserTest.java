package dev.runoff.demo;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.List;
import java.util.concurrent.CopyOnWriteArrayList;
import java.util.concurrent.CountDownLatch;
import java.util.concurrent.TimeUnit;
import org.junit.jupiter.api.Test;

/** Closing in reverse order, once, even when a resource fails or two threads close at once. */
class CloserTest {

    @Test
    void closesLastRegisteredFirstOnceAndPastAFailure() {
        List<String> closed = new CopyOnWriteArrayList<>();
        Closer closer = new Closer();
        closer.register(() -> closed.add("broker"));
        closer.register(() -> {
            closed.add("job");
            throw new IllegalStateException("boom");
        });
        closer.register(() -> closed.add("feed"));
        closer.close();
        closer.close();
        assertEquals(List.of("feed", "job", "broker"), closed);
        assertTrue(closer.isClosed());
        assertThrows(IllegalStateException.class, () -> closer.register(() -> closed.add("late")));
        assertEquals("late", closed.get(3), "a resource registered too late is closed at once");
    }

    @Test
    void aSecondCloserWaitsUntilTheFirstHasClosedEverything() throws Exception {
        List<String> closed = new CopyOnWriteArrayList<>();
        CountDownLatch slowStarted = new CountDownLatch(1);
        CountDownLatch release = new CountDownLatch(1);
        Closer closer = new Closer();
        closer.register(() -> closed.add("broker"));
        closer.register(() -> {
            slowStarted.countDown();
            release.await(10, TimeUnit.SECONDS);
            closed.add("job");
        });
        Thread hook = new Thread(closer::close);
        hook.start();
        assertTrue(slowStarted.await(10, TimeUnit.SECONDS));
        Thread main = new Thread(closer::close);
        main.start();
        main.join(200);
        assertTrue(main.isAlive(), "the second close must wait for the first");
        assertEquals(List.of(), closed, "the broker must not close while the job is closing");
        release.countDown();
        hook.join(10_000);
        main.join(10_000);
        assertEquals(List.of("job", "broker"), closed);
    }
}
