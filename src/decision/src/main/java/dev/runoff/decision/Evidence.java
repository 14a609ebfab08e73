package dev.runoff.decision;

import dev.runoff.engine.best.AdaptiveMonteCarlo;
import dev.runoff.engine.planning.ArmModel;
import dev.runoff.engine.planning.PosteriorRates;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.Collections;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Locale;
import java.util.Map;
import java.util.Objects;

/**
 * How fast each losing arm is being ruled out: per decision and per arm that is not the leader, the evidence
 * against it, {@code -ln P(arm is best)}, and its growth per 1,000 trials over the trailing half of the
 * experiment's trials; at the last decision, whether those growth rates are balanced, and the rates the
 * planner predicts. Takes the numbers a decision record holds (no record types), so that the audit and other
 * views can share it.
 *
 * <p>Design. Under a split that gives arm a the share {@code w_a} of n trials, {@code -ln P(i is best) / n}
 * tends to the pairwise rate {@code C_i(w)} ({@link PosteriorRates}); top-two sampling with parameter beta
 * drives every losing arm's rate to the common value {@code Gamma*_beta}, while a uniform split leaves them
 * as far apart as the pairwise rates at equal shares (Russo 2020, "Simple Bayesian Algorithms for Best-Arm
 * Identification", Operations Research). The observed rate is the least-squares slope of the evidence against
 * the experiment's total trials over the decisions in the trailing window, which removes the level (the
 * prior, the warm-up) and keeps the exponent. The window is a share of the trials ({@value #WINDOW_SHARE}), not
 * a number of decisions: a fixed count of decisions holds ever fewer trials relative to the evidence's own
 * noise, and on a 123-decision demo run the slopes over the last 20 decisions ranged from 0.023 to 0.40 per
 * 1,000 trials for four arms whose evidence stood within 19.7 to 21.7, against 0.21 to 0.23 over the last half.
 *
 * <p>Which value a point uses (the record's estimator decides what a number means):
 * <ul>
 *   <li>an exact value recomputed from the record's posteriors, when the caller supplies one
 *       ({@link Source#RECOMPUTED}; the audit does for Monte Carlo records of up to {@value #MAX_EXACT_ARMS}
 *       arms);</li>
 *   <li>else the record's alpha: integrated ({@link Source#EXACT}); an arm of a Monte Carlo record with
 *       standard error 0 won no draw and holds a conditional (Rao-Blackwellised) integral
 *       ({@link Source#CONDITIONAL}); others hold a share of draws ({@link Source#COUNT});</li>
 *   <li>a zero is never infinite evidence ({@link Source#BOUND}, the value a lower bound): a Monte Carlo
 *       zero stands for at most the one-sided 95% Clopper-Pearson bound at zero wins
 *       ({@link AdaptiveMonteCarlo#zeroWinUpperBound}), an integrated zero for at most the smallest positive
 *       double, {@code -ln 4.9e-324} = {@value #UNDERFLOW_EVIDENCE}. Bounds do not enter the slopes.</li>
 * </ul>
 */
public final class Evidence {

    /** The window of each slope: decisions with at least {@code 1 - WINDOW_SHARE} of the current trials. */
    public static final double WINDOW_SHARE = 0.5;
    /** Fewest point values (no bounds) in the window for a slope. */
    public static final int MIN_POINTS = 5;
    /** Most arms for which the audit recomputes exact probabilities of Monte Carlo records. */
    public static final int MAX_EXACT_ARMS = 8;
    /**
     * Largest ratio of the fastest to the slowest losing arm's rate still called balanced. In seeded runs of
     * the set-up of {@code EvidenceSimulationTest} (eight seeds on each of three instances with three to five
     * Bernoulli arms, 120 decisions of 2,000 trials) the final ratio was 1.00 to 1.39 under top-two Thompson
     * sampling and 7.8 to 25.6 under a uniform split; 2 leaves room for noisier real runs on both sides.
     */
    public static final double BALANCE_TOLERANCE = 2.0;
    /** Evidence shown for an integrated probability of 0: {@code -ln(Double.MIN_VALUE)}. */
    public static final double UNDERFLOW_EVIDENCE = 744.4400719213812;

    private Evidence() {
    }

    /**
     * Where a point's evidence comes from.
     */
    public enum Source {
        /** The record's alpha, integrated numerically. */
        EXACT,
        /** Recomputed by numerical integration from the record's posteriors. */
        RECOMPUTED,
        /** The record's conditional Monte Carlo value of an arm that won no draw. */
        CONDITIONAL,
        /** The record's share of Monte Carlo draws won. */
        COUNT,
        /** A zero probability: the evidence shown is a lower bound. */
        BOUND;

        /** How reports and pages describe the source in words. */
        public String description() {
            return switch (this) {
                case EXACT -> "integrated";
                case RECOMPUTED -> "recomputed exactly";
                case CONDITIONAL -> "conditional Monte Carlo";
                case COUNT -> "share of Monte Carlo draws";
                case BOUND -> "a zero probability: lower bound";
            };
        }
    }

    /**
     * One decision as its record states it.
     *
     * @param arms          arm names, in the record's order
     * @param trials        trials per arm
     * @param alpha         probability of being best per arm
     * @param standardError its standard error per arm
     * @param draws         Monte Carlo draws, 0 for numerical integration
     * @param exact         exact probabilities recomputed from the record's posteriors, or {@code null}
     * @param suspended     per arm, whether a guardrail suspended it at this decision ({@code null}: none); a
     *                      suspended arm is left out of the estimate (alpha 0 by suspension, not by evidence),
     *                      so it has no point, like the leader
     */
    public record Snapshot(List<String> arms, long[] trials, double[] alpha, double[] standardError, int draws,
                           double[] exact, boolean[] suspended) {

        /** Checks the lengths and copies the arrays. */
        public Snapshot {
            arms = List.copyOf(arms);
            int k = arms.size();
            if (trials.length != k || alpha.length != k || standardError.length != k
                    || (exact != null && exact.length != k) || (suspended != null && suspended.length != k)) {
                throw new IllegalArgumentException("snapshot arrays must have one entry per arm (" + k + ")");
            }
            suspended = suspended == null ? new boolean[k] : suspended.clone();
            if (draws < 0) {
                throw new IllegalArgumentException("draws must be >= 0, got " + draws);
            }
            trials = trials.clone();
            alpha = alpha.clone();
            standardError = standardError.clone();
            exact = exact == null ? null : exact.clone();
        }

        /** A snapshot in which no arm is suspended. */
        public Snapshot(List<String> arms, long[] trials, double[] alpha, double[] standardError, int draws,
                        double[] exact) {
            this(arms, trials, alpha, standardError, draws, exact, null);
        }

        /** Trials of all arms together. */
        public long totalTrials() {
            return Arrays.stream(trials).sum();
        }

        /** The arm with the largest alpha (ties to the first). */
        public int leader() {
            int leader = 0;
            for (int i = 1; i < alpha.length; i++) {
                leader = alpha[i] > alpha[leader] ? i : leader;
            }
            return leader;
        }
    }

    /**
     * The evidence against one losing arm at one decision.
     *
     * @param evidence        {@code -ln P(best)}; a lower bound when {@code source} is {@link Source#BOUND}
     * @param source          where it comes from
     * @param ratePerThousand growth of the evidence per 1,000 trials over the trailing window, NaN when the
     *                        window holds fewer than {@value #MIN_POINTS} point values
     */
    public record Point(double evidence, Source source, double ratePerThousand) {

        /** Whether {@link #evidence()} is only a lower bound. */
        public boolean isBound() {
            return source == Source.BOUND;
        }
    }

    /**
     * One decision's evidence.
     *
     * @param totalTrials trials of all arms together
     * @param leader      the arm with the largest P(best)
     * @param points      per losing arm, in the record's order
     */
    public record Row(long totalTrials, String leader, Map<String, Point> points) {

        /** Copies the map, keeping its order. */
        public Row {
            points = Collections.unmodifiableMap(new LinkedHashMap<>(points));
        }
    }

    /** The rows of {@code snapshots}, in their order (each slope over the window ending at its row). */
    public static List<Row> of(List<Snapshot> snapshots) {
        List<Map<String, Point>> losing = new ArrayList<>(snapshots.size());
        List<Row> rows = new ArrayList<>(snapshots.size());
        for (int s = 0; s < snapshots.size(); s++) {
            Snapshot now = snapshots.get(s);
            int leader = now.leader();
            Map<String, Point> values = new LinkedHashMap<>();
            for (int i = 0; i < now.arms().size(); i++) {
                if (i != leader && !now.suspended()[i]) {
                    values.put(now.arms().get(i), value(now, i));
                }
            }
            losing.add(values);
            Map<String, Point> points = new LinkedHashMap<>();
            for (Map.Entry<String, Point> e : values.entrySet()) {
                double rate = slope(snapshots, losing, s, e.getKey());
                points.put(e.getKey(), new Point(e.getValue().evidence(), e.getValue().source(), rate));
            }
            rows.add(new Row(now.totalTrials(), now.arms().get(leader), points));
        }
        return rows;
    }

    /** The evidence against arm {@code i} of {@code s}, without its slope. */
    static Point value(Snapshot s, int i) {
        if (s.exact() != null) {
            return s.exact()[i] > 0 ? point(s.exact()[i], Source.RECOMPUTED) : bound(UNDERFLOW_EVIDENCE);
        }
        double alpha = s.alpha()[i];
        if (s.draws() == 0) {
            return alpha > 0 ? point(alpha, Source.EXACT) : bound(UNDERFLOW_EVIDENCE);
        }
        if (alpha <= 0) {
            return bound(-StrictMath.log(AdaptiveMonteCarlo.zeroWinUpperBound(s.draws())));
        }
        return point(alpha, s.standardError()[i] == 0 ? Source.CONDITIONAL : Source.COUNT);
    }

    private static Point point(double alpha, Source source) {
        return new Point(-StrictMath.log(Math.min(1, alpha)), source, Double.NaN);
    }

    private static Point bound(double evidence) {
        return new Point(evidence, Source.BOUND, Double.NaN);
    }

    /**
     * Least-squares slope, per 1,000 trials, of the evidence against {@code arm} over the snapshots up to
     * {@code last} in the trailing window where the arm is losing with a point value ({@code losing} holds
     * each snapshot's values); NaN with fewer than {@link #MIN_POINTS} such points or no spread in trials.
     */
    private static double slope(List<Snapshot> snapshots, List<Map<String, Point>> losing, int last, String arm) {
        double from = (1 - WINDOW_SHARE) * snapshots.get(last).totalTrials();
        List<double[]> xy = new ArrayList<>();
        for (int s = last; s >= 0 && snapshots.get(s).totalTrials() >= from; s--) {
            Point value = losing.get(s).get(arm);
            if (value != null && !value.isBound()) {
                xy.add(new double[] {snapshots.get(s).totalTrials() / 1000.0, value.evidence()});
            }
        }
        return xy.size() < MIN_POINTS ? Double.NaN : leastSquaresSlope(xy);
    }

    /** The ordinary least-squares slope of y on x (common practice); NaN when every x is the same. */
    static double leastSquaresSlope(List<double[]> xy) {
        double mx = 0;
        double my = 0;
        for (double[] p : xy) {
            mx += p[0];
            my += p[1];
        }
        mx /= xy.size();
        my /= xy.size();
        double sxy = 0;
        double sxx = 0;
        for (double[] p : xy) {
            sxy += (p[0] - mx) * (p[1] - my);
            sxx += (p[0] - mx) * (p[0] - mx);
        }
        return sxx > 0 ? sxy / sxx : Double.NaN;
    }

    /**
     * Whether the losing arms' rates at a decision are balanced.
     *
     * @param verdict one of {@link Verdict}
     * @param slowest the losing arm with the smallest rate (the one that lags), or {@code null}
     * @param fastest the losing arm with the largest rate, or {@code null}
     * @param ratio   fastest rate over slowest rate; NaN when not {@link Verdict#BALANCED} or
     *                {@link Verdict#UNBALANCED}, infinite when the slowest rate is not positive
     */
    public record Balance(Verdict verdict, String slowest, String fastest, double ratio) {
    }

    /** The outcome of {@link #balance(Row)}. */
    public enum Verdict {
        /** Every losing arm has a positive rate and the ratio is within {@link #BALANCE_TOLERANCE}. */
        BALANCED,
        /** The ratio exceeds the tolerance, or some losing arm's evidence is not growing. */
        UNBALANCED,
        /** Fewer than two losing arms have a rate (too few decisions in the window, bounds only, or two arms). */
        UNDETERMINED
    }

    /** The balance of {@code row}'s rates against {@link #BALANCE_TOLERANCE}. */
    public static Balance balance(Row row) {
        String slowest = null;
        String fastest = null;
        for (Map.Entry<String, Point> e : row.points().entrySet()) {
            double rate = e.getValue().ratePerThousand();
            if (Double.isNaN(rate)) {
                continue;
            }
            slowest = slowest == null || rate < row.points().get(slowest).ratePerThousand() ? e.getKey() : slowest;
            fastest = fastest == null || rate > row.points().get(fastest).ratePerThousand() ? e.getKey() : fastest;
        }
        if (slowest == null || slowest.equals(fastest)) {
            return new Balance(Verdict.UNDETERMINED, slowest, fastest, Double.NaN);
        }
        double low = row.points().get(slowest).ratePerThousand();
        double ratio = low > 0 ? row.points().get(fastest).ratePerThousand() / low : Double.POSITIVE_INFINITY;
        return new Balance(ratio <= BALANCE_TOLERANCE ? Verdict.BALANCED : Verdict.UNBALANCED, slowest, fastest,
                ratio);
    }

    /**
     * One line, as reports and pages state it: whether {@code row}'s rates are balanced (its {@code balance}),
     * against the stated tolerance, and which arm lags.
     */
    public static String balanceLine(Balance balance, Row row) {
        String tolerance = number(BALANCE_TOLERANCE);
        return switch (balance.verdict()) {
            case BALANCED -> String.format(Locale.ROOT, "Rates balanced: fastest/slowest %s <= %s (tolerance);"
                    + " slowest %s at %s per 1,000 trials", number(balance.ratio()), tolerance, balance.slowest(),
                    number(rate(row, balance.slowest())));
            case UNBALANCED -> String.format(Locale.ROOT, "Rates not balanced: fastest/slowest %s > %s (tolerance);"
                    + " %s lags at %s per 1,000 trials against %s for %s",
                    Double.isInfinite(balance.ratio()) ? "infinite" : number(balance.ratio()), tolerance,
                    balance.slowest(), number(rate(row, balance.slowest())), number(rate(row, balance.fastest())),
                    balance.fastest());
            case UNDETERMINED -> "Rates balanced: undetermined (fewer than two losing arms with a rate over the last "
                    + windowShare() + " of the trials)";
        };
    }

    /** The window of the slopes as a percentage of the trials, as text ("50%"). */
    public static String windowShare() {
        return String.format(Locale.ROOT, "%.0f%%", 100 * WINDOW_SHARE);
    }

    /** A number with three significant digits, as the evidence lines print them. */
    public static String number(double v) {
        return String.format(Locale.ROOT, "%.3g", v);
    }

    private static double rate(Row row, String arm) {
        return row.points().get(arm).ratePerThousand();
    }

    /**
     * The rates the planner predicts, per 1,000 trials, for Bernoulli arms with the given estimated rates.
     *
     * @param betaOptimal {@code 1000 Gamma*_beta}, NaN when beta is not in (0, 1)
     * @param uniform     {@code 1000} times the uniform split's rate
     * @param beta        the top-two parameter used
     */
    public record Reference(double betaOptimal, double uniform, double beta) {
    }

    /**
     * The predicted rates for estimated Bernoulli rates {@code means} and top-two parameter {@code beta}, or
     * {@code null} when the means do not determine a unique best arm or one is not in (0, 1).
     */
    public static Reference reference(double[] means, double beta) {
        Objects.requireNonNull(means, "means");
        for (double m : means) {
            if (!(m > 0 && m < 1)) {
                return null;
            }
        }
        ArmModel model = ArmModel.bernoulli(means);
        if (model.bestIsTied()) {
            return null;
        }
        double gamma = beta > 0 && beta < 1 ? 1000 * PosteriorRates.betaOptimal(model, beta) : Double.NaN;
        return new Reference(gamma, 1000 * PosteriorRates.uniform(model), beta);
    }
}
