package dev.runoff.client;

import static dev.runoff.client.ControlRecords.NOW;
import static dev.runoff.client.ControlRecords.VALID_UNTIL;
import static dev.runoff.client.ControlRecords.avro;
import static dev.runoff.client.ControlRecords.json;
import static dev.runoff.client.ControlRecords.running;
import static dev.runoff.client.ControlRecords.stopped;
import static dev.runoff.client.ControlRecords.validUntil;
import static dev.runoff.client.ControlRecords.version;
import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.runoff.records.avro.AllocationUpdate;
import java.nio.charset.StandardCharsets;
import java.util.List;
import java.util.Set;
import java.util.function.UnaryOperator;
import org.junit.jupiter.api.Test;

/** The table fed directly, without a broker: applying records, picks, fallbacks and counters. */
class AllocationTableTest {

    private final MutableClock clock = new MutableClock(NOW);

    private AllocationTable table(UnaryOperator<PickPolicy.Builder> policy) {
        return AllocationTable.create(policy.apply(PickPolicy.builder("fallback")).build(), clock);
    }

    private AllocationTable table() {
        return table(p -> p);
    }

    @Test
    void unknownExperimentGetsDefaultArmAndIsCounted() {
        AllocationTable table = table();
        assertEquals("fallback", table.pick("nope", "u1"));
        assertEquals("fallback", table.pick(null, "u1"));
        ServingMetrics metrics = table.metrics();
        assertEquals(2, metrics.picks());
        assertEquals(2, metrics.unknownExperimentPicks());
    }

    @Test
    void nullUnitKeyGetsDefaultArmUnderHashedAssignment() {
        AllocationTable table = table();
        table.apply("e", avro(running("e", 1, "a", 0.5, "b", 0.5)));
        assertEquals("fallback", table.pick("e", null));
        assertEquals(1, table.metrics().missingUnitKeyPicks());
    }

    @Test
    void certainArmIsAlwaysPickedAndZeroWeightArmsNever() {
        AllocationTable table = table();
        assertEquals(ControlRecordOutcome.APPLIED, table.apply("e", avro(running("e", 1, "a", 0.0, "b", 1.0, "c", 0.0))));
        for (int i = 0; i < 10_000; i++) {
            assertEquals("b", table.pick("e", "unit-" + i));
        }
    }

    @Test
    void hashedPickIsStableForUnitAcrossHeartbeatsAndReplicas() {
        AllocationTable first = table();
        first.apply("e", avro(running("e", 7, "a", 0.25, "b", 0.25, "c", 0.5)));
        String[] before = picks(first, "e", 2_000);
        // a heartbeat: same weights, later sequence
        first.apply("e", avro(running("e", 8, "a", 0.25, "b", 0.25, "c", 0.5)));
        assertArrayEquals(before, picks(first, "e", 2_000));
        // a replica that started later sees only the latest (compacted) record
        AllocationTable replica = table();
        replica.apply("e", avro(running("e", 8, "a", 0.25, "b", 0.25, "c", 0.5)));
        assertArrayEquals(before, picks(replica, "e", 2_000));
    }

    @Test
    void assignMakesThePicksChoiceAndSaysWhetherTheArmWasDrawn() {
        AllocationTable table = table(p -> p.staleFallback(StaleFallback.DEFAULT_ARM));
        table.apply("e", avro(running("e", 1, "a", 0.3, "b", 0.3, "c", 0.4)));
        table.apply("s", avro(stopped("s", 1, "b", "a", 0.0, "b", 1.0)));
        for (int i = 0; i < 1_000; i++) {
            ArmAssignment served = table.assign("e", "user-" + i);
            assertEquals(new ArmAssignment("e", "user-" + i, table.pick("e", "user-" + i), true), served);
        }
        assertEquals(new ArmAssignment("s", "u", "b", true), table.assign("s", "u"));
        assertEquals(new ArmAssignment("x", "u", "fallback", false), table.assign("x", "u"));
        assertEquals(new ArmAssignment("e", null, "fallback", false), table.assign("e", null));
        clock.set(VALID_UNTIL + 1);
        assertEquals(new ArmAssignment("e", "u", "fallback", false), table.assign("e", "u"));
        ServingMetrics metrics = table.metrics();
        assertEquals(2_004, metrics.picks());
        assertEquals(1, metrics.unknownExperimentPicks());
        assertEquals(1, metrics.missingUnitKeyPicks());
        assertEquals(1, metrics.stalePicks());
        assertEquals(1, metrics.stoppedPicks());
    }

    @Test
    void staleUniformAndLastWeightsAssignmentsAreDrawn() {
        for (StaleFallback fallback : List.of(StaleFallback.UNIFORM, StaleFallback.LAST_WEIGHTS)) {
            AllocationTable table = table(p -> p.staleFallback(fallback));
            table.apply("e", avro(running("e", 1, "a", 0.5, "b", 0.5)));
            clock.set(VALID_UNTIL + 1);
            assertTrue(table.assign("e", "u").drawn(), fallback.toString());
            clock.set(NOW);
        }
    }

    @Test
    void hashedPicksFollowWeightsInAggregate() {
        AllocationTable table = table();
        table.apply("layout", avro(running("layout", 3, "a", 0.5, "b", 0.3, "c", 0.15, "d", 0.05)));
        long[] counts = ArmCounts.tally(List.of("a", "b", "c", "d"), 100_000, i -> table.pick("layout", "user-" + i));
        double p = ArmCounts.pValue(new double[] {0.5, 0.3, 0.15, 0.05}, counts);
        assertTrue(p > ArmCounts.ALPHA, "chi-square p = " + p + " for counts " + java.util.Arrays.toString(counts));
        // the same test has the power to see a shift of two points between the first two arms
        double shifted = ArmCounts.pValue(new double[] {0.48, 0.32, 0.15, 0.05}, counts);
        assertTrue(shifted < ArmCounts.ALPHA, "chi-square p against shifted weights = " + shifted);
    }

    @Test
    void randomPicksFollowWeightsAndReplayFromSeed() {
        AllocationTable first = table(p -> p.random(SplitMixUniform.seeded(42)));
        AllocationTable second = table(p -> p.random(SplitMixUniform.seeded(42)));
        AllocationUpdate record = running("e", 1, "a", 0.7, "b", 0.2, "c", 0.1);
        first.apply("e", avro(record));
        second.apply("e", avro(record));
        assertArrayEquals(picks(first, "e", 1_000), picks(second, "e", 1_000));
        long[] counts = ArmCounts.tally(List.of("a", "b", "c"), 100_000, i -> first.pick("e", "same-unit"));
        double p = ArmCounts.pValue(new double[] {0.7, 0.2, 0.1}, counts);
        assertTrue(p > ArmCounts.ALPHA, "chi-square p = " + p);
    }

    @Test
    void tombstoneRemovesExperiment() {
        AllocationTable table = table();
        table.apply("e", avro(running("e", 1, "a", 0.0, "b", 1.0)));
        assertEquals(ControlRecordOutcome.REMOVED, table.apply("e", null));
        assertFalse(table.contains("e"));
        assertEquals("fallback", table.pick("e", "u"));
        assertEquals(1, table.metrics().tombstones());
        // after a tombstone numbering may start again
        assertEquals(ControlRecordOutcome.APPLIED, table.apply("e", avro(running("e", 1, "a", 1.0, "b", 0.0))));
        assertEquals("a", table.pick("e", "u"));
    }

    @Test
    void malformedRecordsAreSkippedCountedAndLeaveTheHeldRecord() {
        AllocationTable table = table();
        table.apply("e", avro(running("e", 1, "a", 0.0, "b", 1.0)));
        byte[] corruptAvro = avro(running("e", 2, "a", 1.0, "b", 0.0));
        corruptAvro[corruptAvro.length - 3] ^= 0x7F;
        List<byte[]> bad = List.of(
                "not json".getBytes(StandardCharsets.UTF_8),
                new byte[0],
                new byte[] {(byte) 0xC3, 0x01, 1, 2},
                java.util.Arrays.copyOf(corruptAvro, corruptAvro.length - 1),
                "{\"experimentId\":\"e\",\"sequence\":3}".getBytes(StandardCharsets.UTF_8),
                new String(json(running("e", 4, "a", 0.5, "b", 0.5)), StandardCharsets.UTF_8)
                        .replace("0.5", "0.4").getBytes(StandardCharsets.UTF_8));
        for (byte[] value : bad) {
            assertEquals(ControlRecordOutcome.MALFORMED, table.apply("e", value), new String(value, StandardCharsets.UTF_8));
        }
        assertEquals(ControlRecordOutcome.MALFORMED, table.apply("other", avro(running("e", 5, "a", 1.0, "b", 0.0))));
        assertEquals(ControlRecordOutcome.MALFORMED, table.apply(null, avro(running("e", 6, "a", 1.0, "b", 0.0))));
        assertEquals(bad.size() + 2, table.metrics().malformedRecords());
        assertEquals(1, table.current("e").orElseThrow().getSequence());
        assertEquals("b", table.pick("e", "u"));
    }

    @Test
    void olderOrRepeatedRecordIsOutdatedAndANewVersionNeedsAGreaterSequence() {
        AllocationTable table = table();
        table.apply("e", avro(running("e", 5, "a", 0.0, "b", 1.0)));
        assertEquals(ControlRecordOutcome.OUTDATED, table.apply("e", avro(running("e", 4, "a", 1.0, "b", 0.0))));
        assertEquals(ControlRecordOutcome.OUTDATED, table.apply("e", avro(running("e", 5, "a", 1.0, "b", 0.0))));
        // the job numbers control records across versions: a new version at a lower sequence is not its record
        assertEquals(ControlRecordOutcome.OUTDATED,
                table.apply("e", avro(version(running("e", 1, "a", 1.0, "b", 0.0), Long.MAX_VALUE))));
        assertEquals(3, table.metrics().outdatedRecords());
        assertEquals("b", table.pick("e", "u"));
        assertEquals(ControlRecordOutcome.APPLIED,
                table.apply("e", avro(version(running("e", 6, "a", 1.0, "b", 0.0), 2))));
        assertEquals("a", table.pick("e", "u"));
        // nor does the version move back
        assertEquals(ControlRecordOutcome.OUTDATED, table.apply("e", avro(running("e", 7, "a", 0.0, "b", 1.0))));
        assertEquals("a", table.pick("e", "u"));
    }

    @Test
    void jsonControlRecordIsAccepted() {
        AllocationTable table = table();
        assertEquals(ControlRecordOutcome.APPLIED, table.apply("e", json(running("e", 1, "a", 1.0, "b", 0.0))));
        assertEquals("a", table.pick("e", "u"));
    }

    @Test
    void staleRecordIsUsedUpToValidUntilInclusive() {
        AllocationTable table = table(p -> p.staleFallback(StaleFallback.DEFAULT_ARM));
        table.apply("e", avro(running("e", 1, "a", 1.0, "b", 0.0)));
        clock.set(VALID_UNTIL);
        assertEquals("a", table.pick("e", "u"));
        assertEquals(0, table.metrics().stalePicks());
        clock.set(VALID_UNTIL + 1);
        assertEquals("fallback", table.pick("e", "u"));
        assertEquals(1, table.metrics().stalePicks());
    }

    @Test
    void staleLastWeightsKeepsEveryUnitsArm() {
        AllocationTable table = table(p -> p.staleFallback(StaleFallback.LAST_WEIGHTS));
        table.apply("e", avro(running("e", 1, "a", 0.6, "b", 0.4)));
        String[] fresh = picks(table, "e", 1_000);
        clock.set(VALID_UNTIL + 60_000);
        assertArrayEquals(fresh, picks(table, "e", 1_000));
        assertEquals(1_000, table.metrics().stalePicks());
    }

    @Test
    void staleUniformSpreadsEvenlyOverTheRecordsArms() {
        AllocationTable table = table(p -> p.staleFallback(StaleFallback.UNIFORM));
        table.apply("e", avro(running("e", 1, "a", 0.9, "b", 0.1, "c", 0.0)));
        clock.set(VALID_UNTIL + 1);
        long[] counts = ArmCounts.tally(List.of("a", "b", "c"), 30_000, i -> table.pick("e", "user-" + i));
        double p = ArmCounts.pValue(new double[] {1, 1, 1}, counts);
        assertTrue(p > ArmCounts.ALPHA, "chi-square p = " + p + " for " + java.util.Arrays.toString(counts));
        assertEquals(30_000, table.metrics().stalePicks());
    }

    @Test
    void stoppedExperimentServesWinnerUntilValidUntilThenTheStaleFallback() {
        AllocationTable table = table(p -> p.afterStop(StoppedPick.WINNER).staleFallback(StaleFallback.DEFAULT_ARM));
        table.apply("e", avro(stopped("e", 9, "b", "a", 0.5, "b", 0.5)));
        for (int i = 0; i < 1_000; i++) {
            assertEquals("b", table.pick("e", "user-" + i));
        }
        clock.set(VALID_UNTIL + 1);
        for (int i = 0; i < 1_000; i++) {
            assertEquals("fallback", table.pick("e", "user-" + i));
        }
        assertEquals(1_000, table.metrics().stoppedPicks());
        assertEquals(1_000, table.metrics().stalePicks());
    }

    @Test
    void stoppedExperimentFollowsRecordWeightsByDefault() {
        AllocationTable table = table();
        // a KEEP_WEIGHTS stop: the record keeps both arms in play
        table.apply("e", avro(stopped("e", 9, "b", "a", 0.5, "b", 0.5)));
        Set<String> seen = new java.util.HashSet<>(List.of(picks(table, "e", 200)));
        assertEquals(Set.of("a", "b"), seen);
    }

    @Test
    void currentReturnsACopyOfTheHeldRecord() {
        AllocationTable table = table();
        table.apply("e", avro(running("e", 1, "a", 0.0, "b", 1.0)));
        AllocationUpdate copy = table.current("e").orElseThrow();
        copy.getWeights().get(0).setWeight(1.0);
        copy.setSequence(99);
        assertEquals(1, table.current("e").orElseThrow().getSequence());
        assertEquals(0.0, table.current("e").orElseThrow().getWeights().get(0).getWeight());
        assertEquals(Set.of("e"), table.experimentIds());
        assertTrue(table.current("x").isEmpty());
    }

    @Test
    void picksFromManyThreadsDuringUpdatesAlwaysNameAnArm() throws Exception {
        AllocationTable table = table();
        table.apply("e", avro(running("e", 1, "a", 0.5, "b", 0.5)));
        Thread[] readers = new Thread[4];
        java.util.concurrent.atomic.AtomicReference<String> wrong = new java.util.concurrent.atomic.AtomicReference<>();
        for (int t = 0; t < readers.length; t++) {
            int id = t;
            readers[t] = new Thread(() -> {
                for (int i = 0; i < 200_000; i++) {
                    String arm = table.pick("e", id + "-" + (i & 1023));
                    if (!arm.equals("a") && !arm.equals("b") && !arm.equals("c")) {
                        wrong.set(arm);
                    }
                }
            });
            readers[t].start();
        }
        for (long sequence = 2; sequence < 500; sequence++) {
            boolean three = (sequence & 1) == 0;
            table.apply("e", avro(three ? running("e", sequence, "a", 0.2, "b", 0.3, "c", 0.5)
                    : running("e", sequence, "a", 0.5, "b", 0.5)));
        }
        for (Thread reader : readers) {
            reader.join();
        }
        assertEquals(null, wrong.get());
        assertEquals(800_000, table.metrics().picks());
        assertEquals(499, table.metrics().recordsApplied());
    }

    @Test
    void picksAllocateNothing() {
        AllocationTable table = table(p -> p.staleFallback(StaleFallback.UNIFORM));
        table.apply("e", avro(running("e", 1, "a", 0.4, "b", 0.3, "c", 0.3)));
        table.apply("s", avro(stopped("s", 1, "a", "a", 1.0, "b", 0.0)));
        String[] keys = new String[1024];
        for (int i = 0; i < keys.length; i++) {
            keys[i] = "user-" + i;
            keys[i].hashCode();
        }
        long sink = 0;
        for (int i = 0; i < 20_000; i++) {
            sink += pickAll(table, keys[i & 1023]);
        }
        com.sun.management.ThreadMXBean threads =
                (com.sun.management.ThreadMXBean) java.lang.management.ManagementFactory.getThreadMXBean();
        long before = threads.getCurrentThreadAllocatedBytes();
        for (int i = 0; i < 100_000; i++) {
            sink += pickAll(table, keys[i & 1023]);
        }
        long allocated = threads.getCurrentThreadAllocatedBytes() - before;
        // one object per pick would be at least 16 bytes x 400,000 picks; allow a few stray bytes of the JVM
        assertTrue(allocated < 10_000, allocated + " bytes allocated by 400,000 picks (" + sink + ")");
    }

    private int pickAll(AllocationTable table, String key) {
        clock.set(NOW);
        int length = table.pick("e", key).length() + table.pick("s", key).length() + table.pick("x", key).length();
        clock.set(VALID_UNTIL + 1);
        return length + table.pick("e", key).length();
    }

    @Test
    void policyRejectsBlankDefaultArm() {
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class, () -> PickPolicy.builder(" "));
        assertTrue(e.getMessage().contains("defaultArm"), e.getMessage());
        assertThrows(IllegalArgumentException.class, () -> PickPolicy.builder(null));
    }

    private static String[] picks(AllocationTable table, String experimentId, int n) {
        String[] arms = new String[n];
        for (int i = 0; i < n; i++) {
            arms[i] = table.pick(experimentId, "user-" + i);
        }
        return arms;
    }
}
