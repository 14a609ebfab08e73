package dev.runoff.audit;

import dev.runoff.records.avro.ArmState;
import dev.runoff.records.avro.DecisionRecord;
import dev.runoff.records.avro.EventType;
import dev.runoff.records.avro.ExperimentDefinition;
import dev.runoff.records.avro.MetricKind;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;
import org.apache.commons.math3.stat.inference.ChiSquareTest;

/**
 * Sample-ratio test of one period: did the exposures that each arm received between two consecutive decision
 * records follow the weights the first one published? The serving tier draws arms i.i.d. from those weights,
 * so the exposure counts of the period are multinomial with those probabilities; Pearson's chi-square
 * goodness-of-fit test (Pearson 1900) is computed by Commons Math's {@link ChiSquareTest}.
 *
 * <p>A period is skipped, and says why, when the counts are not exposures (a trial event other than
 * EXPOSURE, or a VALUE metric whose trials are value events), when the arms changed, when there were no
 * exposures, when only one arm had weight, or when an arm with weight has an expected count below
 * {@value #MIN_EXPECTED} (the chi-square approximation is poor there: a common practice rule, Cochran 1954).
 * An arm with weight 0 is left out of the test; any exposure it received flags the period outright.
 *
 * <p>Caveat: the counts in a record are those folded by its stream time. Exposures served just after a
 * weight change under the old weights, or folded late, blur the boundary between periods; with very large
 * periods after a big weight change this can flag a serving tier that followed the weights with a lag.
 */
public final class SampleRatio {

    /** Smallest expected count, in every arm that has weight, for a period to be tested. */
    public static final double MIN_EXPECTED = 5.0;

    private final double alpha;

    /**
     * A test at significance level {@code alpha}.
     *
     * @throws IllegalArgumentException unless {@code 0 < alpha < 0.5}
     */
    public SampleRatio(double alpha) {
        if (!(alpha > 0 && alpha < 0.5)) {
            throw new IllegalArgumentException("alpha must be in (0, 0.5), got " + alpha);
        }
        this.alpha = alpha;
    }

    /** The significance level. */
    public double alpha() {
        return alpha;
    }

    /**
     * Why this experiment's trials are not exposures, or {@code null} when they are (a BERNOULLI metric whose
     * trial event is EXPOSURE).
     */
    public static String notExposures(ExperimentDefinition definition) {
        if (definition.getMetric().getKind() == MetricKind.VALUE) {
            return "trials of a VALUE metric count value events, not exposures";
        }
        EventType trial = definition.getMetric().getTrialEvent();
        return trial == EventType.EXPOSURE ? null : "trials count " + trial + " events, not exposures";
    }

    /** The test of the period from {@code before} to {@code after} (consecutive records of one experiment). */
    public Period test(DecisionRecord before, DecisionRecord after) {
        long from = before.getSequence();
        long to = after.getSequence();
        String notExposures = notExposures(after.getDefinition());
        if (notExposures != null) {
            return Period.skipped(from, to, null, null, notExposures);
        }
        List<String> arms = names(after);
        if (!names(before).equals(arms)) {
            return Period.skipped(from, to, null, null, "the arms changed from " + names(before) + " to " + arms);
        }
        long[] observed = new long[arms.size()];
        double[] weights = new double[arms.size()];
        for (int i = 0; i < observed.length; i++) {
            observed[i] = after.getArms().get(i).getTrials() - before.getArms().get(i).getTrials();
            weights[i] = before.getArms().get(i).getWeight();
        }
        return judge(from, to, arms, observed, weights);
    }

    private Period judge(long from, long to, List<String> arms, long[] observed, double[] weights) {
        long total = 0;
        for (int i = 0; i < observed.length; i++) {
            if (observed[i] < 0) {
                return Period.flagged(from, to, observed, weights, null, null, "the trials of arm '" + arms.get(i)
                        + "' fell by " + -observed[i]);
            }
            if (weights[i] == 0 && observed[i] > 0) {
                return Period.flagged(from, to, observed, weights, null, null, "arm '" + arms.get(i)
                        + "' received " + observed[i] + " exposures at weight 0");
            }
            total += observed[i];
        }
        if (total == 0) {
            return Period.skipped(from, to, observed, weights, "no exposures");
        }
        List<Integer> tested = new ArrayList<>();
        for (int i = 0; i < weights.length; i++) {
            if (weights[i] > 0) {
                if (weights[i] * total < MIN_EXPECTED) {
                    return Period.skipped(from, to, observed, weights, String.format(java.util.Locale.ROOT,
                            "too few exposures (%d): expected count %.2f < %.0f for arm '%s'", total,
                            weights[i] * total, MIN_EXPECTED, arms.get(i)));
                }
                tested.add(i);
            }
        }
        if (tested.size() < 2) {
            return Period.skipped(from, to, observed, weights, "only one arm has weight");
        }
        final long totalExposures = total;
        double[] expected = tested.stream().mapToDouble(i -> weights[i] * totalExposures).toArray();
        long[] counts = tested.stream().mapToLong(i -> observed[i]).toArray();
        ChiSquareTest test = new ChiSquareTest();
        double statistic = test.chiSquare(expected, counts);
        double p = test.chiSquareTest(expected, counts);
        return p < alpha
                ? Period.flagged(from, to, observed, weights, statistic, p, "exposures do not follow the weights")
                : Period.passed(from, to, observed, weights, statistic, p);
    }

    private static List<String> names(DecisionRecord record) {
        return record.getArms().stream().map(ArmState::getArm).toList();
    }

    /** Result of a period's test. */
    public enum Outcome {
        /** Tested, consistent with the weights. */
        PASSED,
        /** The exposures did not follow the weights. */
        FLAGGED,
        /** Not tested; the note says why. */
        SKIPPED
    }

    /**
     * One period between two consecutive records.
     *
     * @param fromSequence sequence of the record whose weights were in force
     * @param toSequence   sequence of the record whose counts end the period
     * @param observed     exposures per arm in the period, or {@code null} when not computed
     * @param weights      the weights in force, or {@code null} when not computed
     * @param statistic    Pearson's chi-square statistic, or {@code null} when not computed
     * @param pValue       its p-value, or {@code null} when not computed
     * @param outcome      passed, flagged or skipped
     * @param note         why it was flagged or skipped, or {@code null} when passed
     */
    public record Period(long fromSequence, long toSequence, long[] observed, double[] weights, Double statistic,
                         Double pValue, Outcome outcome, String note) {

        /** Copies the arrays. */
        public Period {
            observed = observed == null ? null : observed.clone();
            weights = weights == null ? null : weights.clone();
        }

        static Period passed(long from, long to, long[] observed, double[] weights, double statistic, double p) {
            return new Period(from, to, observed, weights, statistic, p, Outcome.PASSED, null);
        }

        static Period flagged(long from, long to, long[] observed, double[] weights, Double statistic, Double p,
                              String note) {
            return new Period(from, to, observed, weights, statistic, p, Outcome.FLAGGED, note);
        }

        static Period skipped(long from, long to, long[] observed, double[] weights, String note) {
            return new Period(from, to, observed, weights, null, null, Outcome.SKIPPED, note);
        }

        @Override
        public long[] observed() {
            return observed == null ? null : observed.clone();
        }

        @Override
        public double[] weights() {
            return weights == null ? null : weights.clone();
        }

        @Override
        public String toString() {
            return "Period[" + fromSequence + "->" + toSequence + " " + outcome + ", observed="
                    + Arrays.toString(observed) + ", weights=" + Arrays.toString(weights) + ", chi2=" + statistic
                    + ", p=" + pValue + (note == null ? "" : ", " + note) + "]";
        }
    }
}
