package dev.runoff.client;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.time.Duration;
import org.junit.jupiter.api.Test;

/** The ticking clock follows its source, never runs ahead of it, and stops on close. */
class CoarseClockTest {

    @Test
    void followsTheSourceWithinTicks() throws InterruptedException {
        MutableClock source = new MutableClock(1_000);
        try (CoarseClock clock = CoarseClock.start(source, Duration.ofMillis(1))) {
            assertEquals(1_000, clock.millis());
            source.set(5_000);
            long deadline = System.nanoTime() + Duration.ofSeconds(10).toNanos();
            while (clock.millis() != 5_000 && System.nanoTime() < deadline) {
                Thread.sleep(1);
            }
            assertEquals(5_000, clock.millis());
            assertEquals(5_000, clock.instant().toEpochMilli());
        }
    }

    @Test
    void staysOnItsLastReadingAfterClose() {
        MutableClock source = new MutableClock(1_000);
        CoarseClock clock = CoarseClock.start(source, Duration.ofMillis(1));
        clock.close();
        assertFalse(clock.isTicking());
        long last = clock.millis();
        source.set(9_000);
        assertEquals(last, clock.millis());
        clock.close();
    }

    @Test
    void staleFallbackStartsOnceTheTickHasSeenValidUntilPass() throws InterruptedException {
        MutableClock source = new MutableClock(ControlRecords.NOW);
        try (CoarseClock clock = CoarseClock.start(source, Duration.ofMillis(1))) {
            AllocationTable table = AllocationTable.create(PickPolicy.builder("fallback")
                    .staleFallback(StaleFallback.DEFAULT_ARM).build(), clock);
            table.apply("e", ControlRecords.avro(ControlRecords.running("e", 1, "a", 1.0, "b", 0.0)));
            assertEquals("a", table.pick("e", "u"));
            source.set(ControlRecords.VALID_UNTIL + 1);
            long deadline = System.nanoTime() + Duration.ofSeconds(10).toNanos();
            while (table.pick("e", "u").equals("a") && System.nanoTime() < deadline) {
                Thread.sleep(1);
            }
            assertEquals("fallback", table.pick("e", "u"));
            assertTrue(table.metrics().stalePicks() >= 1);
        }
    }

    @Test
    void tickMustBePositive() {
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class,
                () -> CoarseClock.start(new MutableClock(0), Duration.ZERO));
        assertTrue(e.getMessage().contains("tick"), e.getMessage());
    }
}
