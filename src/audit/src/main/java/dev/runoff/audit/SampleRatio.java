package dev.runoff.audit;

import dev.runoff.records.avro.ArmState;
import dev.runoff.records.avro.DecisionRecord;
import dev.runoff.records.avro.EventType;
import dev.runoff.records.avro.ExperimentDefinition;
import dev.runoff.records.avro.MetricKind;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;
import java.util.Locale;
import org.apache.commons.math3.distribution.ChiSquaredDistribution;

/**
 * Sample-ratio test of one period: did the exposures that each arm received between two consecutive decision
 * records follow the weights the first one published? The serving tier draws arms i.i.d. from the weights in
 * force, so the exposure counts of a period are multinomial; Pearson's chi-square goodness-of-fit test
 * (Pearson 1900) judges them, its p-value taken from Commons Math's {@link ChiSquaredDistribution}.
 *
 * <p>Pipeline lag: a record's counts are those the job had folded by its stream time, and the job folds
 * exposures some time after they were served, so a period also holds exposures served under the weights of the
 * period before. When those previous weights are known (the caller passes the record before the period) and
 * differ, the expected shares are the mixture {@code lambda * previous + (1 - lambda) * current}, with
 * {@code lambda} in [0, 1] fitted by minimum chi-square ({@link LagMixture}); the statistic then has one
 * degree of freedom fewer, as for any Pearson statistic with a parameter estimated from the same counts
 * (Cramér 1946, "Mathematical Methods of Statistics"). With only two arms that would leave none, so one is
 * kept: conservative, since the minimised statistic never exceeds the one at the true {@code lambda}. When the
 * best {@code lambda} is 0 or 1 the null distribution lies between those of the two degrees of freedom, so
 * the test is then somewhat liberal (a boundary parameter; common practice accepts it). The first period,
 * and one whose previous weights are unknown or equal, gets the plain test against the current weights.
 *
 * <p>A period is skipped, and says why, when the counts are not exposures (a trial event other than
 * EXPOSURE, or a VALUE metric whose trials are value events), when the arms changed, when there were no
 * exposures, when only one arm has a share, or when an arm with a share has an expected count, under the
 * fitted mixture, below {@value #MIN_EXPECTED} (the chi-square approximation is poor there: a common
 * practice rule, Cochran 1954). An arm with weight 0 in both vectors is left out of the test; any exposure it
 * received flags the period outright.
 *
 * <p>Not handled: a lag longer than one period (exposures served under weights two or more records old), as
 * happens when records come faster than the job flushes; such periods can still be flagged.
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

    /** The plain test of the period from {@code before} to {@code after}, as if no weights came before. */
    public Period test(DecisionRecord before, DecisionRecord after) {
        return test(null, before, after);
    }

    /**
     * The test of the period from {@code before} to {@code after} (consecutive records of one experiment),
     * allowing for exposures served under the weights of {@code previous}, the record just before
     * {@code before}; {@code previous} may be {@code null} (first period, or not known), and is ignored when
     * its arms differ.
     */
    public Period test(DecisionRecord previous, DecisionRecord before, DecisionRecord after) {
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
        for (int i = 0; i < observed.length; i++) {
            observed[i] = exposed(after.getArms().get(i)) - exposed(before.getArms().get(i));
        }
        double[] weights = weights(before);
        double[] earlier = previous == null || !names(previous).equals(arms) ? null : weights(previous);
        if (earlier != null && Arrays.equals(earlier, weights)) {
            earlier = null;
        }
        return judge(new Counts(from, to, arms, observed, weights, earlier));
    }

    /** One period's exposures, the weights in force and those of the period before ({@code null} if none). */
    private record Counts(long from, long to, List<String> arms, long[] observed, double[] weights,
                          double[] earlier) {

        boolean neverWeighted(int i) {
            return weights[i] == 0 && (earlier == null || earlier[i] == 0);
        }

        Period skipped(String note) {
            return Period.skipped(from, to, observed, weights, note);
        }

        Period flagged(String note) {
            return new Period(from, to, observed, weights, earlier, null, null, null, Outcome.FLAGGED, note);
        }
    }

    private Period judge(Counts c) {
        long total = 0;
        for (int i = 0; i < c.observed().length; i++) {
            if (c.observed()[i] < 0) {
                return c.flagged("the trials of arm '" + c.arms().get(i) + "' fell by " + -c.observed()[i]);
            }
            if (c.neverWeighted(i) && c.observed()[i] > 0) {
                return c.flagged("arm '" + c.arms().get(i) + "' received " + c.observed()[i]
                        + " exposures at weight 0" + (c.earlier() == null ? "" : " (in this period and the last)"));
            }
            total += c.observed()[i];
        }
        if (total == 0) {
            return c.skipped("no exposures");
        }
        Double lambda = c.earlier() == null ? null : LagMixture.fit(c.observed(), c.earlier(), c.weights());
        double[] shares = lambda == null ? c.weights() : LagMixture.shares(lambda, c.earlier(), c.weights());
        int cells = 0;
        for (int i = 0; i < shares.length; i++) {
            if (shares[i] > 0) {
                if (shares[i] * total < MIN_EXPECTED) {
                    return c.skipped(String.format(Locale.ROOT,
                            "too few exposures (%d): expected count %.2f < %.0f for arm '%s'%s", total,
                            shares[i] * total, MIN_EXPECTED, c.arms().get(i), lambda == null ? ""
                                    : String.format(Locale.ROOT, " (fitted lag share %.3f)", lambda)));
                }
                cells++;
            }
        }
        if (cells < 2) {
            return c.skipped("only one arm has weight");
        }
        double statistic = LagMixture.pearson(c.observed(), shares);
        int df = degreesOfFreedom(cells, lambda != null);
        double p = 1.0 - new ChiSquaredDistribution(null, df).cumulativeProbability(statistic);
        String note = null;
        if (p < alpha) {
            note = lambda == null ? "exposures do not follow the weights" : String.format(Locale.ROOT,
                    "exposures follow no mix of the previous and current weights (best lag share %.3f)", lambda);
        }
        return new Period(c.from(), c.to(), c.observed(), c.weights(), c.earlier(), lambda, statistic, p,
                note == null ? Outcome.PASSED : Outcome.FLAGGED, note);
    }

    /**
     * Degrees of freedom of Pearson's statistic over {@code cells} cells: {@code cells - 1}, one fewer when the
     * lag share was fitted (Cramér 1946), but at least one (see the class comment).
     */
    static int degreesOfFreedom(int cells, boolean fitted) {
        return Math.max(1, cells - 1 - (fitted ? 1 : 0));
    }

    private static double[] weights(DecisionRecord record) {
        return record.getArms().stream().mapToDouble(ArmState::getWeight).toArray();
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
     * @param previousWeights the weights of the period before, when the test allowed for lag, else {@code null}
     * @param lagShare     the fitted share {@code lambda} of exposures served under {@code previousWeights},
     *                     or {@code null} when not fitted
     * @param statistic    Pearson's chi-square statistic, or {@code null} when not computed
     * @param pValue       its p-value, or {@code null} when not computed
     * @param outcome      passed, flagged or skipped
     * @param note         why it was flagged or skipped, or {@code null} when passed
     */
    public record Period(long fromSequence, long toSequence, long[] observed, double[] weights,
                         double[] previousWeights, Double lagShare, Double statistic, Double pValue, Outcome outcome,
                         String note) {

        /** Copies the arrays. */
        public Period {
            observed = observed == null ? null : observed.clone();
            weights = weights == null ? null : weights.clone();
            previousWeights = previousWeights == null ? null : previousWeights.clone();
        }

        static Period skipped(long from, long to, long[] observed, double[] weights, String note) {
            return new Period(from, to, observed, weights, null, null, null, null, Outcome.SKIPPED, note);
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
        public double[] previousWeights() {
            return previousWeights == null ? null : previousWeights.clone();
        }

        @Override
        public String toString() {
            return "Period[" + fromSequence + "->" + toSequence + " " + outcome + ", observed="
                    + Arrays.toString(observed) + ", weights=" + Arrays.toString(weights) + ", previous="
                    + Arrays.toString(previousWeights) + ", lag=" + lagShare + ", chi2=" + statistic
                    + ", p=" + pValue + (note == null ? "" : ", " + note) + "]";
        }
    }

    /**
     * Units (or exposures) an arm has been served so far: its trials, plus with unit counting its pending
     * units, whose windows have not closed. A unit is pending from its first exposure, so the difference
     * between two records is the new units served between them, whenever their windows close.
     */
    private static long exposed(ArmState arm) {
        return arm.getTrials() + (arm.getPending() == null ? 0 : arm.getPending());
    }
}
