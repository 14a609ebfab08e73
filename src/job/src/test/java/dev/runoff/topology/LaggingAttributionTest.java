package dev.runoff.topology;

import static org.junit.jupiter.api.Assertions.assertEquals;

import dev.runoff.decision.ExperimentState;
import dev.runoff.engine.stats.BernoulliStats;
import dev.runoff.testkit.TestDefinitions;
import java.util.Arrays;
import java.util.List;
import java.util.Map;
import org.apache.kafka.streams.state.KeyValueStore;
import org.junit.jupiter.api.AfterEach;
import org.junit.jupiter.api.Test;

/**
 * Conversion windows close by what the job has read, not by how late it reads it (TopologyTestDriver: the
 * wall clock is advanced by the test, stream time follows the record timestamps the test gives). A job that
 * lags behind its input has a wall clock past a window's end before it has read the outcomes stamped inside
 * the window; it must not count the unit yet. A task that has read nothing for the idle time closes by the
 * wall clock alone.
 */
class LaggingAttributionTest {

    private static final long WINDOW = 1_000;
    private static final long IDLE = 5_000;

    private final TopologyFixture job = new TopologyFixture(TopologySettings.fromMap(Map.of(
            TopologySettings.FLUSH_INTERVAL_KEY, 100, TopologySettings.ALLOCATE_INTERVAL_KEY, 100,
            TopologySettings.DEDUPE_WINDOW_KEY, 3_600_000, TopologySettings.UNITS_CLOSE_IDLE_KEY, IDLE)));

    @AfterEach
    void close() {
        job.close();
    }

    @Test
    void aLaggingJobCountsAUnitOnlyOnceItHasReadPastTheWindowAndTakesTheSuccessStampedInside() {
        job.define(TestDefinitions.withWindow(TestDefinitions.bernoulli("lag", "a", "b"), WINDOW));
        job.advance(150);
        long t = job.clock();
        job.event("u1", Events.exposure("lag", "u1", "x1", "a", t), t);
        job.event("u2", Events.exposure("lag", "u2", "y1", "b", t), t);
        job.advance(2 * WINDOW);

        assertEquals(List.of(BernoulliStats.EMPTY, BernoulliStats.EMPTY), job.state("lag").stats(),
                "the wall clock is past both windows, but the job has read nothing stamped after them");
        assertEquals(List.of(1L, 1L), pending(job.state("lag")));

        job.event("u1", Events.click("lag", "u1", "c1", null, t + WINDOW - 100), t + WINDOW - 100);
        job.advance(300);
        assertEquals(List.of(BernoulliStats.EMPTY, BernoulliStats.EMPTY), job.state("lag").stats(),
                "a success stamped inside the window, read late, is taken and the unit still waits");

        job.event("u3", Events.exposure("lag", "u3", "z1", "a", t + WINDOW + 500), t + WINDOW + 500);
        job.advance(300);
        assertEquals(List.of(new BernoulliStats(1, 1), new BernoulliStats(1, 0)), job.state("lag").stats(),
                "once the job has read past the windows, u1 is counted a success and u2 a failure");
        assertEquals(List.of(1L, 0L), pending(job.state("lag")), "u3's window is still open in stream time");
        assertEquals(List.of(), job.rejected(), "no late-outcome");
    }

    @Test
    void anIdleTaskClosesByTheWallClockAfterTheIdleTime() {
        job.define(TestDefinitions.withWindow(TestDefinitions.bernoulli("idle", "a", "b"), WINDOW));
        job.advance(150);
        long t = job.clock();
        job.event("u1", Events.exposure("idle", "u1", "x1", "a", t), t);
        job.advance(IDLE - 300);
        assertEquals(List.of(BernoulliStats.EMPTY, BernoulliStats.EMPTY), job.state("idle").stats(),
                "past the window by the wall clock, but not yet idle");
        assertEquals(List.of(1L, 0L), pending(job.state("idle")));

        job.advance(600);
        assertEquals(List.of(new BernoulliStats(1, 0), BernoulliStats.EMPTY), job.state("idle").stats(),
                "after the idle time the wall clock alone closes the window");
        assertEquals(List.of(0L, 0L), pending(job.state("idle")));
    }

    @Test
    void aWindowDeadlineInTheEarlierKeyLayoutIsStillClosed() {
        job.define(TestDefinitions.withWindow(TestDefinitions.bernoulli("old", "a", "b"), WINDOW));
        job.advance(150);
        long t = job.clock();
        job.event("u1", Events.exposure("old", "u1", "x1", "a", t), t);
        KeyValueStore<String, byte[]> deadlines = job.store(RunoffTopology.DEADLINES_STORE);
        String unitKey = UnitEvent.unitKey("old", "u1");
        deadlines.delete(Attribution.deadline(t + WINDOW, 'C', unitKey));
        // the layout of the first release: the time as 19 digits, then the kind, then the unit key
        deadlines.put(String.format(java.util.Locale.ROOT, "%019d", t + WINDOW) + 'C' + unitKey, new byte[0]);
        job.advance(IDLE + 600);
        assertEquals(List.of(new BernoulliStats(1, 0), BernoulliStats.EMPTY), job.state("old").stats(),
                "the window left in the earlier layout closed like any other");
        assertEquals(List.of(0L, 0L), pending(job.state("old")));
    }

    private static List<Long> pending(ExperimentState state) {
        return Arrays.stream(state.pending()).boxed().toList();
    }
}
