package dev.runoff.topology;

import static dev.runoff.topology.TopologyFixture.T0;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNull;

import dev.runoff.engine.stats.BernoulliStats;
import dev.runoff.records.avro.ExperimentDefinition;
import dev.runoff.testkit.TestDefinitions;
import java.util.ArrayList;
import java.util.List;
import java.util.Map;
import org.apache.kafka.streams.state.KeyValueStore;
import org.apache.kafka.streams.state.WindowStore;
import org.junit.jupiter.api.AfterEach;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.parallel.Execution;
import org.junit.jupiter.api.parallel.ExecutionMode;

/**
 * Deduplication through the units' entries ({@link SeenEvents}, {@link UnitEntry}) under the test driver: the
 * window on the wall clock, the entry's bound, events of units without a trial event, units the clean-up
 * drops, and the window store an earlier version of the job wrote.
 */
@Execution(ExecutionMode.CONCURRENT)
class SeenEventsTopologyTest {

    private static final long WINDOW = 10_000;
    private static final TopologySettings SETTINGS = TopologySettings.fromMap(Map.of(
            TopologySettings.FLUSH_INTERVAL_KEY, 100, TopologySettings.ALLOCATE_INTERVAL_KEY, 100,
            TopologySettings.DEDUPE_WINDOW_KEY, WINDOW, TopologySettings.UNITS_CLOSE_IDLE_KEY, 200,
            TopologySettings.UNITS_CLEANUP_INTERVAL_KEY, 500, TopologySettings.UNITS_RETENTION_MARGIN_KEY, 0));

    private final TopologyFixture job = new TopologyFixture(SETTINGS);

    @AfterEach
    void close() {
        job.close();
    }

    @Test
    void aRedeliveryWithinTheWindowIsDroppedAndAfterItCountsAgain() {
        job.define(TestDefinitions.perExposure(TestDefinitions.bernoulli("win", "a", "b")));
        byte[] exposure = Events.exposure("win", "u1", "e-1", "a", T0);
        job.event("u1", exposure);
        job.advance(WINDOW - 1_000);
        job.event("u1", exposure);
        assertEquals(1, job.counters().count(JobCounters.DUPLICATE), "seen 9 s ago: inside the 10 s window");
        job.advance(2_000);
        job.event("u1", exposure);
        assertEquals(1, job.counters().count(JobCounters.DUPLICATE), "seen 11 s ago: outside the window");
        job.advance(TestDefinitions.RECOMPUTE_MS + 100);
        assertEquals(new BernoulliStats(2, 0), job.state("win").stats().get(0),
                "the first copy and the one after the window are trials (per-exposure counting)");
        assertEquals(List.of(), job.rejected());
    }

    @Test
    void idsAreKeptPerUnitSoTwoUnitsSharingAnIdAreBothCounted() {
        job.define(TestDefinitions.perExposure(TestDefinitions.bernoulli("shared", "a", "b")));
        job.event("u1", Events.exposure("shared", "u1", "e-1", "a", T0));
        job.event("u2", Events.exposure("shared", "u2", "e-1", "a", T0));
        job.event("u2", Events.exposure("shared", "u2", "e-1", "a", T0));
        assertEquals(1, job.counters().count(JobCounters.DUPLICATE), "only u2's redelivery");
        job.advance(TestDefinitions.RECOMPUTE_MS + 100);
        assertEquals(new BernoulliStats(2, 0), job.state("shared").stats().get(0));
    }

    @Test
    void idsPushedOutOfTheEntryByItsBoundAreStillDeduplicated() {
        job.define(TestDefinitions.perExposure(TestDefinitions.bernoulli("many", "a", "b")));
        int events = UnitEntry.MAX_SEEN + 24;
        for (int i = 0; i < events; i++) {
            job.event("u1", Events.exposure("many", "u1", "e-" + i, "a", T0));
        }
        UnitEntry entry = this.<String, UnitEntry>units().get(UnitEvent.unitKey("many", "u1"));
        assertEquals(UnitEntry.MAX_SEEN, entry.seen().size(), "the entry keeps its bound");
        assertEquals(24, ids(job.windowStore(RunoffTopology.OVERFLOW_STORE)), "the rest went to the overflow store");
        for (int i = 0; i < events; i++) {
            job.event("u1", Events.exposure("many", "u1", "e-" + i, "a", T0));
        }
        assertEquals(events, job.counters().count(JobCounters.DUPLICATE), "every redelivery, kept or pushed out");
        job.advance(TestDefinitions.RECOMPUTE_MS + 100);
        assertEquals(new BernoulliStats(events, 0), job.state("many").stats().get(0));
    }

    @Test
    void anOutcomeRejectedBeforeItsUnitHasATrialIsDroppedAsADuplicateWhenRedelivered() {
        ExperimentDefinition def = TestDefinitions.bernoulli("early", "a", "b");
        def.setEarlyOutcomeGraceMs(0L);
        job.define(def);
        byte[] click = Events.click("early", "u1", "c-1", null, T0);
        job.event("u1", click);
        job.event("u1", click);
        assertEquals(1, job.rejected().size(), "rejected once as unattributed");
        assertEquals(1, job.counters().count(JobCounters.DUPLICATE));
        assertNull(this.<String, UnitEntry>units().get(UnitEvent.unitKey("early", "u1")).unit(),
                "an entry with the id only: the unit has no trial event");
    }

    @Test
    void anOutcomeHeldForItsUnitsTrialIsHeldOnce() {
        ExperimentDefinition def = TestDefinitions.bernoulli("held", "a", "b");
        def.setEarlyOutcomeGraceMs(5_000L);
        job.define(def);
        byte[] click = Events.click("held", "u1", "c-1", null, T0);
        job.event("u1", click);
        job.event("u1", click);
        job.event("u1", Events.exposure("held", "u1", "x-1", "a", T0));
        job.event("u1", click);
        assertEquals(1, job.counters().count(JobCounters.EARLY_HELD), "held once");
        assertEquals(2, job.counters().count(JobCounters.DUPLICATE), "before and after the release");
        job.advance(TestDefinitions.WINDOW_MS + TestDefinitions.RECOMPUTE_MS + 500);
        assertEquals(new BernoulliStats(1, 1), job.state("held").stats().get(0));
        assertEquals(List.of(), job.rejected());
    }

    @Test
    void aUnitDroppedByTheCleanUpKeepsItsIdsForTheWindow() {
        job.define(TestDefinitions.perExposure(TestDefinitions.withWindow(
                TestDefinitions.bernoulli("gone", "a", "b"), 1_000)));
        byte[] exposure = Events.exposure("gone", "u1", "e-1", "a", T0);
        job.event("u1", exposure);
        job.advance(3_000);
        UnitEntry entry = this.<String, UnitEntry>units().get(UnitEvent.unitKey("gone", "u1"));
        assertNull(entry.unit(), "the unit is dropped 1 s after its window (margin 0)");
        job.event("u1", exposure);
        assertEquals(1, job.counters().count(JobCounters.DUPLICATE), "its id is still within the 10 s window");
        job.advance(WINDOW);
        assertNull(this.<String, UnitEntry>units().get(UnitEvent.unitKey("gone", "u1")),
                "deleted once its ids left the window");
    }

    @Test
    void idsTheEarlierWindowStoreHoldsAreDuplicatesAfterTheUpgrade() {
        job.define(TestDefinitions.perExposure(TestDefinitions.bernoulli("up", "a", "b")));
        WindowStore<String, byte[]> earlier = job.windowStore(RunoffTopology.DEDUPE_STORE);
        earlier.put(UnitEvent.eventKey("up", "e-1"), new byte[] {1}, T0 - 2_000);
        earlier.put(UnitEvent.eventKey("up", "e-2"), new byte[] {1}, T0 - 3_000);
        byte[] format5 = new BinaryOut().writeByte(5).writeString("a").writeLong(1).writeBoolean(false)
                .writeLong(T0 - 2_000).writeLong(T0 - 2_000).writeLong(1).writeLong(0).writeLong(60_000)
                .writeBoolean(false).writeLong(T0 - 2_000).writeInt(0).writeDouble(Double.NaN).writeDouble(0)
                .writeInt(0).toByteArray();
        this.<String, UnitEntry>units().put(UnitEvent.unitKey("up", "u1"),
                UnitEntry.SERDE.deserializer().deserialize("t", format5));
        job.event("u1", Events.exposure("up", "u1", "e-1", "a", T0 - 2_000));
        job.event("u2", Events.exposure("up", "u2", "e-2", "b", T0 - 3_000));
        job.event("u3", Events.exposure("up", "u3", "e-3", "b", T0));
        assertEquals(2, job.counters().count(JobCounters.DUPLICATE),
                "e-1 (its unit's entry in the earlier format) and e-2 (no entry) were seen by the earlier job");
        job.advance(TestDefinitions.RECOMPUTE_MS + 100);
        assertEquals(new BernoulliStats(0, 0), job.state("up").stats().get(0), "e-1 not counted again");
        assertEquals(new BernoulliStats(1, 0), job.state("up").stats().get(1), "e-3 alone");
    }

    @Test
    void bothWindowStoresHoldAnAnchorOnceTheTaskHasStarted() {
        for (String store : List.of(RunoffTopology.DEDUPE_STORE, RunoffTopology.OVERFLOW_STORE)) {
            List<String> keys = new ArrayList<>();
            try (var all = job.windowStore(store).all()) {
                all.forEachRemaining(kv -> keys.add(kv.key.key()));
            }
            assertEquals(List.of(SeenEvents.ANCHOR), keys, store + ": only the anchor, before any event");
        }
    }

    private <K, V> KeyValueStore<K, V> units() {
        return job.store(RunoffTopology.UNITS_STORE);
    }

    /** Records of {@code store} other than its anchor. */
    private static int ids(WindowStore<String, byte[]> store) {
        int n = 0;
        try (var all = store.all()) {
            while (all.hasNext()) {
                if (!SeenEvents.ANCHOR.equals(all.next().key.key())) {
                    n++;
                }
            }
        }
        return n;
    }
}
