package dev.runoff.audit;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.runoff.records.HashChain;
import dev.runoff.records.avro.ArmState;
import dev.runoff.records.avro.DecisionRecord;
import dev.runoff.records.avro.EventType;
import dev.runoff.records.avro.ExperimentDefinition;
import dev.runoff.records.avro.MetricKind;
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
    void feedServedPartlyUnderThePreviousWeightsPasses() {
        // 40% of each period's exposures were served under the weights of the period before.
        double[][] weights = cycle(PERIODS);
        List<DecisionRecord> chain = Chains.lagged("srm", ARMS, weights, weights, 0.4, 1_000, 9, false);
        ExperimentAudit audit = new Verifier(0.001).verifyExperiment("srm", Chains.entries(chain));
        // Seeded; alpha 0.001 per period (a little more where the fitted share sits at 0 or 1).
        assertEquals(PERIODS - 1, audit.count(SampleRatio.Outcome.PASSED), audit.periods().toString());
        for (SampleRatio.Period p : audit.periods().subList(1, PERIODS - 1)) {
            // The fitted share estimates the 40% lag; binomial noise on 1,000 exposures is a few percent.
            assertEquals(0.4, p.lagShare(), 0.1, p.toString());
        }
        // Without the previous weights the same periods fail: the lag is what the mixture allows for.
        assertTrue(periods(chain).stream().skip(1).allMatch(p -> p.outcome() == SampleRatio.Outcome.FLAGGED));
    }

    @Test
    void feedThatFollowsNeitherTheNewNorThePreviousWeightsIsFlagged() {
        double[][] weights = cycle(PERIODS);
        double[][] served = Chains.repeat(new double[] {0.1, 0.45, 0.45}, PERIODS);
        List<DecisionRecord> chain = Chains.lagged("srm", ARMS, weights, served, 0.4, 1_000, 10, false);
        ExperimentAudit audit = new Verifier(0.001).verifyExperiment("srm", Chains.entries(chain));
        assertEquals(PERIODS - 1, audit.count(SampleRatio.Outcome.FLAGGED), audit.periods().toString());
        Finding last = audit.findings().stream().filter(f -> f.check() == Check.SAMPLE_RATIO)
                .reduce((a, b) -> b).orElseThrow();
        assertTrue(last.message().contains("follow no mix of the 3 weight vectors") && last.message().contains("best mix"),
                last.message());
    }

    @Test
    void fittedMixtureKeepsThePlainDegreesOfFreedom() {
        // Worked by hand: previous weights (1/2, 1/2, 0), current (0, 1/2, 1/2), observed (30, 60, 10). The
        // mixture is (l/2, 1/2, (1-l)/2); Pearson's statistic 2*30^2/(100 l) + 2*10^2/(100 (1-l)) + const is
        // least at l = 30 / (30 + 10) = 0.75, where the expected counts are (37.5, 50, 12.5) and the statistic
        // is 7.5^2/37.5 + 10^2/50 + 2.5^2/12.5 = 1.5 + 2 + 0.5 = 4.0. The test keeps the cells - 1 = 2 degrees
        // of freedom of the plain test (conservative, see SampleRatio): P(chi-square_2 > 4.0) = exp(-4/2) =
        // 0.1353 (chi-square_2 survival, exact). Until the contract allowed any valid vector this case used
        // 1 degree of freedom (Cramér 1946) and p = 0.0455.
        SampleRatio.Period p = afterChange(new double[] {0.5, 0.5, 0.0}, new double[] {0.0, 0.5, 0.5},
                new long[] {30, 60, 10});
        assertEquals(0.75, p.lagShare(), 1e-6);
        assertEquals(4.0, p.statistic(), 1e-9);
        assertEquals(StrictMath.exp(-2.0), p.pValue(), 1e-6);
        assertEquals(2, p.candidates());
    }

    @Test
    void exposureOfAnArmAtWeightZeroInBothPeriodsIsFlagged() {
        SampleRatio.Period p = afterChange(new double[] {0.6, 0.4, 0.0}, new double[] {0.4, 0.6, 0.0},
                new long[] {50, 45, 2});
        assertEquals(SampleRatio.Outcome.FLAGGED, p.outcome());
        assertTrue(p.note().contains("arm 'c' received 2 exposures at weight 0"), p.note());
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
    void valuePerUnitTrialsAreExposedUnitsAndAreTestedWhileValueEventsAreNot() {
        ExperimentDefinition perUnit = Chains.definition("srm", List.of("a", "b"));
        perUnit.setMetric(MetricSpec.newBuilder().setKind(MetricKind.VALUE_PER_UNIT).setValueEvent(EventType.VALUE)
                .setValueCap(100.0).build());
        ExperimentDefinition perEvent = Chains.definition("srm", List.of("a", "b"));
        perEvent.setMetric(MetricSpec.newBuilder().setKind(MetricKind.VALUE).setValueEvent(EventType.VALUE).build());
        SampleRatio.Period tested = periodOf(perUnit);
        assertEquals(SampleRatio.Outcome.FLAGGED, tested.outcome(), "90 to 10 exposed units at weights 1/2, 1/2");
        SampleRatio.Period skipped = periodOf(perEvent);
        assertEquals(SampleRatio.Outcome.SKIPPED, skipped.outcome());
        assertTrue(skipped.note().contains("count value events, not exposures"), skipped.note());
    }

    private static SampleRatio.Period periodOf(ExperimentDefinition def) {
        DecisionRecord before = DecisionRecord.newBuilder(record(1, new long[] {0, 0}, new double[] {0.5, 0.5}))
                .setDefinition(def).build();
        DecisionRecord after = DecisionRecord.newBuilder(record(2, new long[] {90, 10}, new double[] {0.5, 0.5}))
                .setDefinition(def).build();
        return new SampleRatio(0.001).test(before, after);
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

    /** The period under {@code current} weights, after one under {@code previous}, with these exposures. */
    private static SampleRatio.Period afterChange(double[] previous, double[] current, long[] exposures) {
        long[] none = new long[exposures.length];
        return new SampleRatio(0.001).test(record(1, none, previous), record(2, none, current),
                record(3, exposures, current));
    }

    /** Weights that change every period, cycling through three vectors. */
    private static double[][] cycle(int n) {
        double[][] choices = {SKEWED, UNIFORM, {0.1, 0.2, 0.7}};
        double[][] out = new double[n][];
        for (int i = 0; i < n; i++) {
            out[i] = choices[i % choices.length].clone();
        }
        return out;
    }

    /** A record of the first {@code trials.length} arms of {@link #ARMS} with the given trials and weights. */
    private static DecisionRecord record(long sequence, long[] trials, double[] weights) {
        DecisionRecord base = Chains.chain("srm", ARMS.subList(0, trials.length), Chains.repeat(weights, 1),
                Chains.repeat(weights, 1), 0, 1, false).get(0);
        List<ArmState> arms = new ArrayList<>();
        for (int i = 0; i < trials.length; i++) {
            arms.add(ArmState.newBuilder(base.getArms().get(i)).setTrials(trials[i]).setSuccesses(0L).build());
        }
        return HashChain.seal(DecisionRecord.newBuilder(base).setSequence(sequence).setArms(arms).build(),
                HashChain.GENESIS);
    }
}
