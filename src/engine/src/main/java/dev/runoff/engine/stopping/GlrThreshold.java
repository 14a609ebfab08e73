package dev.runoff.engine.stopping;

import dev.runoff.engine.core.Checks;
import dev.runoff.engine.core.Metric;
import java.util.Objects;

/**
 * Thresholds {@code beta(t, delta)} for the GLR (Chernoff) stopping rule: stop at the first t where
 * {@code Z(t) > beta(t, delta)}.
 */
public enum GlrThreshold {

    /**
     * Proven delta-correct for a fixed truth, under any sampling rule and with the rule checked after every
     * trial: {@link #bernoulli} for Bernoulli arms, {@link #gaussian} for value arms (guarantee for known
     * variances). The default.
     */
    PROVEN {
        @Override
        public double value(Metric metric, long t, int arms, double delta) {
            Objects.requireNonNull(metric, "metric");
            return metric == Metric.BERNOULLI ? bernoulli(t, arms, delta) : gaussian(t, arms, delta);
        }

        @Override
        public String toString() {
            return "PROVEN: log(2t(K-1)/delta) for Bernoulli (Garivier & Kaufmann 2016); "
                    + "2 C_G(log((K-1)/delta)/2) + 4 log(4 + log(t/2)) for Gaussian (Kaufmann & Koolen 2021)";
        }
    },

    /**
     * NOT PROVEN: {@link #lighterNotProven}, {@code log((1 + log t) / delta)}, the lighter threshold Garivier
     * &amp; Kaufmann (2016) used in their experiments (section 6) and which behaved well there. It carries NO
     * proven error guarantee: it stops earlier than {@link #PROVEN}, and its error rate is unknown.
     */
    LIGHTER_NOT_PROVEN {
        @Override
        public double value(Metric metric, long t, int arms, double delta) {
            Objects.requireNonNull(metric, "metric");
            checkArms(arms);
            return lighterNotProven(t, delta);
        }

        @Override
        public String toString() {
            return "LIGHTER_NOT_PROVEN: log((1 + log t)/delta), NOT PROVEN delta-correct (heuristic)";
        }
    };

    /**
     * The threshold at t trials in total.
     *
     * @param metric the arms' metric
     * @param t      total trials over all arms, {@code >= 1}
     * @param arms   number of arms K, {@code >= 2}
     * @param delta  error probability, in (0, 1)
     */
    public abstract double value(Metric metric, long t, int arms, double delta);

    /**
     * {@code log(2 t (K - 1) / delta)}: with the Bernoulli GLR statistic, the rule identifies the best arm
     * with probability at least {@code 1 - delta} whatever the sampling rule (Garivier &amp; Kaufmann 2016,
     * "Optimal Best Arm Identification with Fixed Confidence", COLT, section 3: Theorem 10 and the Bernoulli
     * threshold stated after it; numbering from memory).
     */
    public static double bernoulli(long t, int arms, double delta) {
        check(t, arms, delta);
        return StrictMath.log(2.0 * t * (arms - 1) / delta);
    }

    /**
     * {@code 2 C_G(log((K - 1) / delta) / 2) + 4 log(4 + log(t / 2))}: delta-correct for the Gaussian GLR
     * statistic with known variances, under any sampling rule (Kaufmann &amp; Koolen 2021, "Mixture
     * Martingales Revisited with Applications to Sequential Tests and Confidence Intervals", JMLR 22;
     * written from memory). It comes from their deviation inequality for two arms,
     * {@code 2 C_G(x / 2) + 2 log(4 + log N_a) + 2 log(4 + log N_b)} with a union bound over the K - 1
     * challengers, and {@code log(4 + log N_a) + log(4 + log N_b) <= 2 log(4 + log(t / 2))} by concavity.
     */
    public static double gaussian(long t, int arms, double delta) {
        check(t, arms, delta);
        return 2 * GaussianCalibration.cG(StrictMath.log((arms - 1) / delta) / 2)
                + 4 * StrictMath.log(4 + StrictMath.log(t / 2.0));
    }

    /** {@code log((1 + log t) / delta)}: NOT PROVEN delta-correct; see {@link #LIGHTER_NOT_PROVEN}. */
    public static double lighterNotProven(long t, double delta) {
        checkTrials(t);
        Checks.inOpenRange("delta", delta, 0, 1);
        return StrictMath.log((1 + StrictMath.log(t)) / delta);
    }

    private static void check(long t, int arms, double delta) {
        checkTrials(t);
        checkArms(arms);
        Checks.inOpenRange("delta", delta, 0, 1);
    }

    private static void checkTrials(long t) {
        if (t < 1) {
            throw new IllegalArgumentException("total trials t must be >= 1, got " + t);
        }
    }

    private static void checkArms(int arms) {
        if (arms < 2) {
            throw new IllegalArgumentException("number of arms must be >= 2, got " + arms);
        }
    }
}
