package dev.runoff.audit;

import dev.runoff.records.avro.ArmState;
import dev.runoff.records.avro.DecisionRecord;
import dev.runoff.records.avro.EventType;
import dev.runoff.records.avro.ExperimentDefinition;
import dev.runoff.records.avro.MetricKind;
import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.Arrays;
import java.util.List;
import java.util.Map;
import java.util.Locale;
import org.apache.commons.math3.distribution.ChiSquaredDistribution;

/**
 * Sample-ratio test of one period: did the units first served between two consecutive decision records follow
 * the weights that serving was allowed to use? Each unit's arm is drawn i.i.d. from a weight vector in force,
 * so the counts of a period are multinomial with shares in the convex hull of those vectors; Pearson's
 * chi-square goodness-of-fit statistic (Pearson 1900), minimised over that hull, judges them, its p-value taken
 * from Commons Math's {@link ChiSquaredDistribution}.
 *
 * <p>The contract: a serving tier may use any published weight vector whose {@code validUntil} (the decision
 * record's {@code streamTime} plus its definition's {@code validForMs}, as the control record is built) has not
 * passed, and after the latest one's has passed it falls back to its staleness policy, by default uniform over
 * the record's arms. The candidates of the period from {@code before} to {@code after} are therefore the
 * weights of {@code before} and of every earlier record of the same arms with
 * {@code streamTime + validForMs >= before.streamTime}, deduplicated, the newest first, at most
 * {@value #MAX_CANDIDATES} (older ones are dropped, which can only make the test stricter); plus the uniform
 * vector when {@code before}'s validity ended before {@code after.streamTime}. This also covers the pipeline
 * lag (units served under earlier weights and folded in this period) as long as it is within a validity window.
 * Other staleness policies (last weights, a default arm) are not allowed for.
 *
 * <p>The mixture {@code lambda} on the simplex is fitted by minimum chi-square ({@link MixtureFit},
 * Frank-Wolfe with a certified duality gap), and the period is flagged only when the certified lower bound of
 * the minimum exceeds the critical value, so a loosely converged fit never flags an honest period.
 *
 * <p>Degrees of freedom: {@code cells - 1}, those of the plain test. Under the contract the true shares are some
 * point of the candidate hull; the minimised statistic never exceeds the statistic at that point, which is
 * asymptotically chi-square with {@code cells - 1} degrees of freedom (Pearson 1900). So the test's level is at
 * most {@code alpha}: conservative, whatever the number of candidates or where the minimum lies (inside the
 * hull or on its boundary). The price is power: with a fitted-parameter correction (Cramér 1946) the test would
 * be sharper when the hull is small, and the more candidates, the larger the hull and the larger a deviation
 * must be to be flagged. With one candidate this is exactly the plain test.
 *
 * <p>A period is skipped, and says why, when the counts are not exposures (a trial event other than
 * EXPOSURE, or a VALUE metric whose trials are value events; a VALUE_PER_UNIT metric's trials are exposed
 * units, counted like a Bernoulli metric's, and are tested), when the arms changed, when there were no
 * exposures, when only one arm has a share, or when an arm with a share has an expected count, under the
 * fitted mixture, below {@value #MIN_EXPECTED} (the chi-square approximation is poor there: a common
 * practice rule, Cochran 1954). An arm with weight 0 in every candidate is left out of the test; any exposure
 * it received flags the period outright, as does a negative count.
 */
public final class SampleRatio {

    /** Smallest expected count, in every arm that has weight, for a period to be tested. */
    public static final double MIN_EXPECTED = 5.0;

    /** Most candidate weight vectors per period (the newest distinct ones); older ones are left out. */
    public static final int MAX_CANDIDATES = 64;

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
     * Why this experiment's trials are not exposures, or {@code null} when they are (a BERNOULLI or
     * VALUE_PER_UNIT metric whose trial event is EXPOSURE).
     */
    public static String notExposures(ExperimentDefinition definition) {
        if (definition.getMetric().getKind() == MetricKind.VALUE) {
            return "trials of a VALUE metric count value events, not exposures";
        }
        EventType trial = definition.getMetric().getTrialEvent();
        return trial == EventType.EXPOSURE ? null : "trials count " + trial + " events, not exposures";
    }

    /** The test of the period from {@code before} to {@code after}, as if no weights came before. */
    public Period test(DecisionRecord before, DecisionRecord after) {
        return test(List.of(before), after);
    }

    /**
     * The test of the period from {@code before} to {@code after}, with {@code previous} (may be {@code null})
     * the only record known before {@code before}.
     */
    public Period test(DecisionRecord previous, DecisionRecord before, DecisionRecord after) {
        return test(previous == null ? List.of(before) : List.of(previous, before), after);
    }

    /**
     * The test of the period that ends at {@code after}: {@code history} holds the records of the experiment
     * read before {@code after}, in order, the last being {@code before}, the record just before it.
     *
     * @throws IllegalArgumentException when {@code history} is empty
     */
    public Period test(List<DecisionRecord> history, DecisionRecord after) {
        if (history.isEmpty()) {
            throw new IllegalArgumentException("history must hold at least the record before the period");
        }
        DecisionRecord before = history.get(history.size() - 1);
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
        return judge(new Counts(from, to, arms, observed, weights(before), previousWeights(history),
                candidates(history, after)));
    }

    /**
     * The weight vectors valid at some time in the period, newest first, keyed by the sequence of the newest
     * record that published each ({@code null} for the uniform fallback).
     */
    static Map<double[], Long> candidates(List<DecisionRecord> history, DecisionRecord after) {
        DecisionRecord before = history.get(history.size() - 1);
        List<String> arms = names(before);
        Map<double[], Long> out = new LinkedHashMap<>();
        for (int j = history.size() - 1; j >= 0 && out.size() < MAX_CANDIDATES; j--) {
            DecisionRecord r = history.get(j);
            boolean valid = validUntil(r) >= before.getStreamTime();
            if (!valid && r.getDefinitionVersion() == before.getDefinitionVersion()) {
                break; // same validForMs and earlier stream times: every older record of this version expired too
            }
            if (valid && names(r).equals(arms) && r.getStreamTime() <= after.getStreamTime()) {
                double[] w = weights(r);
                if (out.keySet().stream().noneMatch(v -> Arrays.equals(v, w))) {
                    out.put(w, r.getSequence());
                }
            }
        }
        if (validUntil(before) < after.getStreamTime()) {
            double[] uniform = new double[arms.size()];
            Arrays.fill(uniform, 1.0 / arms.size());
            if (out.keySet().stream().noneMatch(v -> Arrays.equals(v, uniform))) {
                out.put(uniform, null);
            }
        }
        return out;
    }

    private static long validUntil(DecisionRecord r) {
        long validFor = r.getDefinition().getValidForMs();
        return r.getStreamTime() > Long.MAX_VALUE - validFor ? Long.MAX_VALUE : r.getStreamTime() + validFor;
    }

    /** The weights of the record before {@code before}, when it has the same arms and other weights. */
    private static double[] previousWeights(List<DecisionRecord> history) {
        if (history.size() < 2) {
            return null;
        }
        DecisionRecord before = history.get(history.size() - 1);
        DecisionRecord previous = history.get(history.size() - 2);
        if (!names(previous).equals(names(before)) || Arrays.equals(weights(previous), weights(before))) {
            return null;
        }
        return weights(previous);
    }

    /** One period's exposures, the weights of {@code before}, of the record before it, and the candidates. */
    private record Counts(long from, long to, List<String> arms, long[] observed, double[] weights,
                          double[] earlier, Map<double[], Long> candidates) {

        boolean neverWeighted(int i) {
            return candidates.keySet().stream().allMatch(v -> v[i] == 0);
        }

        double[][] vectors() {
            return candidates.keySet().toArray(new double[0][]);
        }

        Period skipped(String note) {
            return Period.skipped(from, to, observed, weights, note);
        }

        Period flagged(String note) {
            return new Period(from, to, observed, weights, earlier, candidates.size(), null, null, null, null,
                    null, null, null, Outcome.FLAGGED, note);
        }
    }

    private Period judge(Counts c) {
        long total = 0;
        int k = c.candidates().size();
        for (int i = 0; i < c.observed().length; i++) {
            if (c.observed()[i] < 0) {
                return c.flagged("the trials of arm '" + c.arms().get(i) + "' fell by " + -c.observed()[i]);
            }
            if (c.neverWeighted(i) && c.observed()[i] > 0) {
                return c.flagged("arm '" + c.arms().get(i) + "' received " + c.observed()[i]
                        + " exposures at weight 0" + (k == 1 ? "" : " (in every one of the " + k
                        + " weight vectors valid in the period)"));
            }
            total += c.observed()[i];
        }
        if (total == 0) {
            return c.skipped("no exposures");
        }
        MixtureFit.Result fit = MixtureFit.fit(c.observed(), c.vectors());
        List<Component> mixture = components(c.candidates(), fit.lambda());
        Double lagShare = k == 1 ? null : 1.0 - fit.lambda()[0];
        double[] shares = fit.shares();
        int cells = 0;
        for (int i = 0; i < shares.length; i++) {
            if (shares[i] > 0) {
                if (shares[i] * total < MIN_EXPECTED) {
                    return c.skipped(String.format(Locale.ROOT,
                            "too few exposures (%d): expected count %.2f < %.0f for arm '%s'%s", total,
                            shares[i] * total, MIN_EXPECTED, c.arms().get(i), k == 1 ? ""
                                    : " (fitted mix of " + k + " weight vectors: " + describe(mixture) + ")"));
                }
                cells++;
            }
        }
        if (cells < 2) {
            return c.skipped("only one arm has weight");
        }
        double bound = fit.lowerBound();
        double p = 1.0 - new ChiSquaredDistribution(null, cells - 1).cumulativeProbability(bound);
        String note = null;
        if (p < alpha) {
            note = k == 1 ? "exposures do not follow the weights" : "exposures follow no mix of the " + k
                    + " weight vectors valid in the period (best mix: " + describe(mixture) + ")";
        }
        return new Period(c.from(), c.to(), c.observed(), c.weights(), c.earlier(), k, mixture, shares, lagShare,
                fit.statistic(), fit.gap(), p, alpha, note == null ? Outcome.PASSED : Outcome.FLAGGED, note);
    }

    /**
     * The periods of one experiment judged together, so that {@code alpha} bounds the chance of flagging any
     * period of an honest experiment, however many periods it has: the periods with a p-value go through Holm's
     * step-down procedure ({@link Holm}); a period flagged at {@code alpha} alone but not at its Holm level is
     * passed, with a note saying so. Skipped periods, periods flagged without a p-value (exposures at weight 0,
     * falling counts: impossible under the serving contract) and {@code null} entries are kept as they are.
     *
     * @param periods the experiment's periods in order, each judged alone by {@link #test}
     * @return a new list, in the same order
     */
    public List<Period> acrossPeriods(List<Period> periods) {
        List<Integer> tested = new ArrayList<>();
        for (int i = 0; i < periods.size(); i++) {
            if (periods.get(i) != null && periods.get(i).pValue() != null) {
                tested.add(i);
            }
        }
        double[] p = tested.stream().mapToDouble(i -> periods.get(i).pValue()).toArray();
        Holm.Result holm = Holm.test(p, alpha);
        boolean[] rejected = holm.rejected();
        List<Period> out = new ArrayList<>(periods);
        for (int j = 0; j < p.length; j++) {
            Period q = periods.get(tested.get(j));
            double level = holm.levels()[j];
            String note = q.note();
            Outcome outcome = rejected[j] ? Outcome.FLAGGED : Outcome.PASSED;
            if (!rejected[j] && q.outcome() == Outcome.FLAGGED) {
                note = String.format(Locale.ROOT, "p = %.3g is below alpha %s but not below Holm's level %.4g"
                        + " over the experiment's %d tested periods", q.pValue(), alpha, level, p.length);
            }
            out.set(tested.get(j), new Period(q.fromSequence(), q.toSequence(), q.observed, q.weights,
                    q.previousWeights, q.candidates(), q.mixture(), q.fittedShares, q.lagShare(), q.statistic(),
                    q.gap(), q.pValue(), level, outcome, note));
        }
        return out;
    }

    /** The candidates with a share of the fitted mixture, largest first. */
    private static List<Component> components(Map<double[], Long> candidates, double[] lambda) {
        List<Component> out = new ArrayList<>();
        int j = 0;
        for (Long sequence : candidates.values()) {
            if (lambda[j] > 1e-6) {
                out.add(new Component(sequence, lambda[j]));
            }
            j++;
        }
        out.sort((a, b) -> Double.compare(b.share(), a.share()));
        return out;
    }

    /** Compact text of a mixture, shares below 0.0005 left out: {@code "#12 0.600, #11 0.300, uniform 0.100"}. */
    static String describe(List<Component> mixture) {
        StringBuilder out = new StringBuilder();
        for (Component m : mixture) {
            if (m.share() < 0.0005) {
                continue;
            }
            out.append(out.length() == 0 ? "" : ", ").append(m.sequence() == null ? "uniform" : "#" + m.sequence())
                    .append(String.format(Locale.ROOT, " %.3f", m.share()));
        }
        return out.toString();
    }

    /**
     * One weight vector's share of a fitted mixture.
     *
     * @param sequence the newest record that published the vector, or {@code null} for the uniform fallback
     * @param share    its share {@code lambda}
     */
    public record Component(Long sequence, double share) {
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
     * @param fromSequence    sequence of the record whose weights were published last before the period
     * @param toSequence      sequence of the record whose counts end the period
     * @param observed        exposures per arm in the period, or {@code null} when not computed
     * @param weights         the weights of the record at {@code fromSequence}, or {@code null} when not computed
     * @param previousWeights the weights of the record before that, when it is known and differs, else
     *                        {@code null}
     * @param candidates      number of distinct weight vectors serving could use in the period (including the
     *                        uniform fallback), or {@code null} when not computed
     * @param mixture         the fitted mixture (candidates with a share, largest first), or {@code null}
     * @param fittedShares    the expected shares per arm under the fitted mixture, or {@code null}
     * @param lagShare        the fitted share of vectors older than the one at {@code fromSequence}, or
     *                        {@code null} when there was one candidate
     * @param statistic       Pearson's chi-square statistic at the fitted mixture, or {@code null}
     * @param gap             the Frank-Wolfe duality gap of the fit (the statistic minus it bounds the minimum
     *                        from below), or {@code null}
     * @param pValue          the p-value of that lower bound, or {@code null} when not computed
     * @param level           the level the p-value was compared with: {@code alpha} for a period judged alone,
     *                        Holm's step-down level when judged with the experiment's other periods
     *                        ({@link #acrossPeriods}); {@code null} when not computed
     * @param outcome         passed, flagged or skipped
     * @param note            why it was flagged or skipped, or {@code null} when passed
     */
    public record Period(long fromSequence, long toSequence, long[] observed, double[] weights,
                         double[] previousWeights, Integer candidates, List<Component> mixture,
                         double[] fittedShares, Double lagShare, Double statistic, Double gap, Double pValue,
                         Double level, Outcome outcome, String note) {

        /** Copies the arrays. */
        public Period {
            observed = observed == null ? null : observed.clone();
            weights = weights == null ? null : weights.clone();
            previousWeights = previousWeights == null ? null : previousWeights.clone();
            mixture = mixture == null ? null : List.copyOf(mixture);
            fittedShares = fittedShares == null ? null : fittedShares.clone();
        }

        static Period skipped(long from, long to, long[] observed, double[] weights, String note) {
            return new Period(from, to, observed, weights, null, null, null, null, null, null, null, null, null,
                    Outcome.SKIPPED, note);
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
        public double[] fittedShares() {
            return fittedShares == null ? null : fittedShares.clone();
        }

        @Override
        public String toString() {
            return "Period[" + fromSequence + "->" + toSequence + " " + outcome + ", observed="
                    + Arrays.toString(observed) + ", weights=" + Arrays.toString(weights) + ", candidates="
                    + candidates + ", mix=" + (mixture == null ? null : describe(mixture)) + ", chi2=" + statistic
                    + ", gap=" + gap + ", p=" + pValue + ", level=" + level + (note == null ? "" : ", " + note) + "]";
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
