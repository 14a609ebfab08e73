package dev.runoff.audit;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.runoff.engine.AllocationEngine;
import dev.runoff.records.CanonicalJson;
import dev.runoff.records.HashChain;
import dev.runoff.records.avro.ArmState;
import dev.runoff.records.avro.Decision;
import dev.runoff.records.avro.DecisionRecord;
import dev.runoff.records.avro.MetricKind;
import dev.runoff.decision.Evaluator;
import dev.runoff.decision.ExperimentState;
import java.nio.charset.StandardCharsets;
import java.util.ArrayList;
import java.util.Collections;
import java.util.List;
import java.util.function.UnaryOperator;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;

class VerifierTest {

    private static final List<String> ARMS = List.of("control", "green", "blue");
    private static List<DecisionRecord> chain;

    @BeforeAll
    static void runJob() {
        chain = SimulatedJob.run(SimulatedJob.definition("checkout", ARMS, 0), new double[] {0.04, 0.05, 0.09}, 40,
                600, 11);
    }

    private static ExperimentAudit verify(List<DecisionRecord> records) {
        List<ExperimentAudit> audits = new Verifier(0.001).verify(Chains.entries(records));
        assertEquals(1, audits.size());
        return audits.get(0);
    }

    @Test
    void jobChainVerifiesAndEveryRecordIsReproduced() {
        assertTrue(chain.size() >= 5, "several decisions: " + chain.size());
        assertEquals(Decision.STOP, chain.get(chain.size() - 1).getDecision(), "the run reaches a STOP");
        ExperimentAudit audit = verify(chain);
        assertTrue(audit.passed(), audit.findings().toString());
        assertEquals(chain.size(), audit.reproduced());
        assertTrue(audit.count(SampleRatio.Outcome.PASSED) > 0, audit.periods().toString());
    }

    @Test
    void alteredFieldFailsTheHashOfThatRecord() {
        DecisionRecord altered = DecisionRecord.newBuilder(chain.get(3)).setAllocationBeta(0.6).build();
        List<Entry> entries = new ArrayList<>(Chains.entries(chain));
        entries.set(3, new EntryDecoder(Chains.T0).decode(CanonicalJson.of(altered).getBytes(StandardCharsets.UTF_8),
                null, Position.line(4)));
        ExperimentAudit audit = new Verifier(0.001).verifyExperiment("checkout", entries);
        Finding first = audit.firstFailure().orElseThrow();
        assertEquals(4L, first.sequence());
        assertEquals(Position.line(4), first.position());
        assertEquals(Check.CHAIN, first.check());
        assertEquals("hash", first.field());
    }

    @Test
    void deletedRecordFailsAtTheRecordAfterIt() {
        List<DecisionRecord> records = new ArrayList<>(chain);
        records.remove(2);
        Finding first = verify(records).firstFailure().orElseThrow();
        assertEquals(4L, first.sequence());
        assertEquals(Position.line(3), first.position());
        assertEquals(Check.CHAIN, first.check());
        assertEquals("previousHash", first.field());
    }

    @Test
    void reorderedRecordsFailAtTheFirstOfThem() {
        List<DecisionRecord> records = new ArrayList<>(chain);
        Collections.swap(records, 2, 3);
        ExperimentAudit audit = verify(records);
        Finding first = audit.firstFailure().orElseThrow();
        assertEquals(4L, first.sequence());
        assertEquals(Position.line(3), first.position());
        assertTrue(audit.findings().stream().anyMatch(f -> f.check() == Check.SEQUENCE && f.sequence() == 4L));
    }

    @Test
    void changedCountWithARebuiltChainFailsRecomputationOfThatRecord() {
        int k = 4;
        List<DecisionRecord> records = resealedFrom(k, r -> {
            List<ArmState> arms = new ArrayList<>(r.getArms());
            ArmState green = arms.get(1);
            arms.set(1, ArmState.newBuilder(green).setSuccesses(green.getSuccesses() + 1).build());
            return DecisionRecord.newBuilder(r).setArms(arms).build();
        });
        assertTrue(HashChain.firstBreak(records).isEmpty(), "the forger rebuilt the chain");
        ExperimentAudit audit = verify(records);
        Finding first = audit.firstFailure().orElseThrow();
        assertEquals(k + 1L, first.sequence());
        assertEquals(Check.RECOMPUTATION, first.check());
        assertTrue(first.field().startsWith("arms["), first.toString());
    }

    @Test
    void forgedStopFailsTheStoppingCheck() {
        int k = 2;
        List<DecisionRecord> records = resealedFrom(k, r -> DecisionRecord.newBuilder(r).setDecision(Decision.STOP)
                .setWinner("blue").build());
        Finding first = verify(records).firstFailure().orElseThrow();
        assertEquals(k + 1L, first.sequence());
        assertEquals(Check.STOPPING, first.check());
        assertEquals("decision", first.field());
    }

    @Test
    void otherEngineVersionIsNamedInsteadOfFailingSilently() {
        List<DecisionRecord> records = resealedFrom(1, r -> DecisionRecord.newBuilder(r).setEngineVersion("0.9")
                .build());
        Finding first = verify(records).firstFailure().orElseThrow();
        assertEquals(2L, first.sequence());
        assertEquals("engineVersion", first.field());
        assertTrue(first.message().contains("0.9") && first.message().contains(AllocationEngine.VERSION),
                first.message());
    }

    @Test
    void minimumDurationGuardIsReadFromTheRecords() {
        long minDuration = 6 * SimulatedJob.PERIOD_MS;
        List<DecisionRecord> records = SimulatedJob.run(SimulatedJob.definition("slow", ARMS, minDuration),
                new double[] {0.02, 0.02, 0.2}, 12, 600, 5);
        assertTrue(records.stream().anyMatch(r -> r.getReason().equals("min-duration")),
                "the guard held a stop back");
        ExperimentAudit audit = verify(records);
        assertTrue(audit.passed(), audit.findings().toString());
        assertEquals(records.size(), audit.reproduced());
    }

    @Test
    void minimumDurationClaimedTooLateIsAStoppingFailure() {
        long minDuration = 6 * SimulatedJob.PERIOD_MS;
        List<DecisionRecord> records = SimulatedJob.run(SimulatedJob.definition("slow", ARMS, minDuration),
                new double[] {0.02, 0.02, 0.2}, 12, 600, 5);
        int stop = records.size() - 1;
        assertEquals("threshold-reached", records.get(stop).getReason());
        // The forger replaces the stop by the CONTINUE the job would give had the experiment only just started.
        DecisionRecord original = records.get(stop);
        double[] before = records.get(stop - 1).getArms().stream().mapToDouble(ArmState::getWeight).toArray();
        ExperimentState justStarted = new ExperimentState(original.getDefinition(), original.getArms().stream()
                .map(a -> Recomputation.stats(a, MetricKind.BERNOULLI)).toList(), null, original.getSequence() - 1, 0,
                original.getPreviousHash(), before, original.getStreamTime(), -1, -1, false, false);
        DecisionRecord held = new Evaluator(2_000).evaluate(justStarted, original.getStreamTime()).decision();
        assertEquals("min-duration", held.getReason());
        List<DecisionRecord> forged = new ArrayList<>(records.subList(0, stop));
        forged.add(held);
        forged = HashChain.chain(forged);
        Finding first = verify(forged).firstFailure().orElseThrow();
        assertEquals((long) stop + 1, first.sequence());
        assertEquals(Check.STOPPING, first.check(), first.toString());
        assertEquals("startedAt", first.field(), first.toString());
    }

    @Test
    void jobRecordsHoldTheStartTheGuardMeasuredFrom() {
        long minDuration = 6 * SimulatedJob.PERIOD_MS;
        List<DecisionRecord> records = SimulatedJob.run(SimulatedJob.definition("slow", ARMS, minDuration),
                new double[] {0.02, 0.02, 0.2}, 12, 600, 5);
        DecisionRecord last = records.get(records.size() - 1);
        long firstTrialsAt = records.stream().filter(r -> r.getArms().stream().anyMatch(a -> a.getTrials() > 0))
                .findFirst().orElseThrow().getStreamTime();
        assertTrue(last.getStartedAt() != null && last.getStartedAt() <= firstTrialsAt, last.toString());
        assertTrue(last.getStreamTime() - last.getStartedAt() >= minDuration, "the stop came after the guard");
    }

    @Test
    void startedAtMovedEarlierWithARebuiltChainFailsRecomputation() {
        long minDuration = 6 * SimulatedJob.PERIOD_MS;
        List<DecisionRecord> records = new ArrayList<>(SimulatedJob.run(SimulatedJob.definition("slow", ARMS,
                minDuration), new double[] {0.02, 0.02, 0.2}, 12, 600, 5));
        int held = firstHeldBack(records);
        DecisionRecord original = records.get(held);
        records.set(held, DecisionRecord.newBuilder(original).setStartedAt(original.getStartedAt() - minDuration)
                .build());
        Finding first = verify(HashChain.chain(records)).firstFailure().orElseThrow();
        assertEquals(original.getSequence(), first.sequence());
        // The earlier start meets the guard, so the job would have stopped: the weights after the stop differ
        // first (the fields are compared in schema order), and the finding names the start it used.
        assertEquals(Check.RECOMPUTATION, first.check(), first.toString());
        assertTrue(first.field().startsWith("arms["), first.toString());
        assertTrue(first.message().contains("startedAt " + (original.getStartedAt() - minDuration)), first.message());
    }

    @Test
    void recordsWithoutStartedAtStillVerifyFromEarlierRecords() {
        long minDuration = 6 * SimulatedJob.PERIOD_MS;
        List<DecisionRecord> records = SimulatedJob.run(SimulatedJob.definition("slow", ARMS, minDuration),
                new double[] {0.02, 0.02, 0.2}, 12, 600, 5);
        List<DecisionRecord> oldStyle = HashChain.chain(records.stream()
                .map(r -> DecisionRecord.newBuilder(r).setStartedAt(null).build()).toList());
        firstHeldBack(oldStyle);
        ExperimentAudit audit = verify(oldStyle);
        assertTrue(audit.passed(), audit.findings().toString());
        assertEquals(oldStyle.size(), audit.reproduced());
    }

    /** Index of the first record whose stop the minimum-duration guard held back. */
    private static int firstHeldBack(List<DecisionRecord> records) {
        for (int i = 0; i < records.size(); i++) {
            if (records.get(i).getReason().equals("min-duration")) {
                return i;
            }
        }
        throw new AssertionError("the guard held no stop back");
    }

    /** The chain with {@code change} applied to record index {@code k} and every record resealed. */
    private static List<DecisionRecord> resealedFrom(int k, UnaryOperator<DecisionRecord> change) {
        List<DecisionRecord> records = new ArrayList<>(chain);
        records.set(k, change.apply(records.get(k)));
        return HashChain.chain(records);
    }
}
