package dev.runoff.audit;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.runoff.records.HashChain;
import dev.runoff.records.avro.ArmState;
import dev.runoff.records.avro.DecisionRecord;
import dev.runoff.records.avro.EventType;
import dev.runoff.records.avro.ExperimentDefinition;
import dev.runoff.records.avro.MetricSpec;
import java.util.ArrayList;
import java.util.List;
import org.junit.jupiter.api.Test;

class SampleRatioTest {

    private static final List<String> ARMS = List.of("a", "b", "c");
    private static final double[] SKEWED = {0.7, 0.2, 0.1};
    private static final double[] UNIFORM = {1.0 / 3, 1.0 / 3, 1.0 / 3};
    private static final int PERIODS = 12;

    @Test
    void feedThatFollowsTheWeightsPasses() {
        List<DecisionRecord> chain = Chains.chain("srm", ARMS, Chains.repeat(SKEWED, PERIODS),
                Chains.repeat(SKEWED, PERIODS), 1_000, 7, false);
        List<SampleRatio.Period> periods = periods(chain);
        assertEquals(PERIODS - 1, periods.size());
        // Seeded; with alpha 0.001 each honest period is flagged with probability 0.001.
        assertTrue(periods.stream().allMatch(p -> p.outcome() == SampleRatio.Outcome.PASSED), periods.toString());
    }

    @Test
    void feedThatIgnoresTheWeightsIsFlaggedInEveryPeriod() {
        List<DecisionRecord> chain = Chains.chain("srm", ARMS, Chains.repeat(SKEWED, PERIODS),
                Chains.repeat(UNIFORM, PERIODS), 1_000, 7, false);
        List<SampleRatio.Period> periods = periods(chain);
        assertTrue(periods.stream().allMatch(p -> p.outcome() == SampleRatio.Outcome.FLAGGED), periods.toString());
        assertTrue(periods.get(0).pValue() < 1e-12, periods.get(0).toString());
    }

    @Test
    void verifierNamesTheFirstFlaggedPeriod() {
        double[][] served = Chains.repeat(SKEWED, PERIODS);
        served[5] = UNIFORM;
        List<DecisionRecord> chain = Chains.chain("srm", ARMS, Chains.repeat(SKEWED, PERIODS), served, 1_000, 8,
                false);
        ExperimentAudit audit = new Verifier(0.001).verifyExperiment("srm", Chains.entries(chain));
        Finding srm = audit.findings().stream().filter(f -> f.check() == Check.SAMPLE_RATIO).findFirst()
                .orElseThrow();
        assertEquals(7L, srm.sequence(), srm.toString());
        assertTrue(srm.message().contains("since sequence 6"), srm.message());
        assertEquals(1, audit.count(SampleRatio.Outcome.FLAGGED));
    }

    @Test
    void pearsonStatisticMatchesAHandWorkedExample() {
        // Worked by hand (Pearson 1900): observed 60/40 against 50/50 gives (10^2 + 10^2) / 50 = 4.0, and
        // P(chi-square with 1 degree of freedom > 4.0) = 0.0455 (from memory; tables give 3.841 at p = 0.05).
        SampleRatio.Period p = new SampleRatio(0.001).test(record(1, new long[] {0, 0}, new double[] {0.5, 0.5}),
                record(2, new long[] {60, 40}, new double[] {0.5, 0.5}));
        assertEquals(4.0, p.statistic(), 1e-12);
        assertEquals(0.0455, p.pValue(), 5e-5);
        assertEquals(SampleRatio.Outcome.PASSED, p.outcome());
    }

    @Test
    void periodWithTooFewExposuresIsSkippedAndSaysWhy() {
        SampleRatio.Period p = new SampleRatio(0.001).test(record(1, new long[] {0, 0}, new double[] {0.9, 0.1}),
                record(2, new long[] {30, 10}, new double[] {0.9, 0.1}));
        assertEquals(SampleRatio.Outcome.SKIPPED, p.outcome());
        assertTrue(p.note().contains("expected count 4.00 < 5 for arm 'b'"), p.note());
    }

    @Test
    void exposureOfAnArmAtWeightZeroIsFlagged() {
        SampleRatio.Period p = new SampleRatio(0.001).test(record(1, new long[] {0, 0}, new double[] {1.0, 0.0}),
                record(2, new long[] {500, 3}, new double[] {1.0, 0.0}));
        assertEquals(SampleRatio.Outcome.FLAGGED, p.outcome());
        assertTrue(p.note().contains("arm 'b' received 3 exposures at weight 0"), p.note());
    }

    @Test
    void trialsThatAreNotExposuresAreNotTested() {
        ExperimentDefinition def = Chains.definition("srm", List.of("a", "b"));
        def.setMetric(MetricSpec.newBuilder(def.getMetric()).setTrialEvent(EventType.CLICK)
                .setSuccessEvent(EventType.CONVERSION).build());
        DecisionRecord before = DecisionRecord.newBuilder(record(1, new long[] {0, 0}, new double[] {0.5, 0.5}))
                .setDefinition(def).build();
        DecisionRecord after = DecisionRecord.newBuilder(record(2, new long[] {90, 10}, new double[] {0.5, 0.5}))
                .setDefinition(def).build();
        SampleRatio.Period p = new SampleRatio(0.001).test(before, after);
        assertEquals(SampleRatio.Outcome.SKIPPED, p.outcome());
        assertTrue(p.note().contains("CLICK events, not exposures"), p.note());
    }

    @Test
    void alphaOutsideItsRangeIsRejected() {
        IllegalArgumentException e = org.junit.jupiter.api.Assertions.assertThrows(IllegalArgumentException.class,
                () -> new SampleRatio(0.0));
        assertTrue(e.getMessage().contains("alpha"), e.getMessage());
    }

    private static List<SampleRatio.Period> periods(List<DecisionRecord> chain) {
        SampleRatio test = new SampleRatio(0.001);
        List<SampleRatio.Period> periods = new ArrayList<>();
        for (int i = 1; i < chain.size(); i++) {
            periods.add(test.test(chain.get(i - 1), chain.get(i)));
        }
        return periods;
    }

    /** A two-arm record with the given trials and weights. */
    private static DecisionRecord record(long sequence, long[] trials, double[] weights) {
        DecisionRecord base = Chains.chain("srm", List.of("a", "b"), Chains.repeat(weights, 1),
                Chains.repeat(weights, 1), 0, 1, false).get(0);
        List<ArmState> arms = new ArrayList<>();
        for (int i = 0; i < trials.length; i++) {
            arms.add(ArmState.newBuilder(base.getArms().get(i)).setTrials(trials[i]).setSuccesses(0L).build());
        }
        return HashChain.seal(DecisionRecord.newBuilder(base).setSequence(sequence).setArms(arms).build(),
                HashChain.GENESIS);
    }
}
