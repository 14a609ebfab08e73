package dev.runoff.engine.planning;

import dev.runoff.engine.stopping.Divergence;

import dev.runoff.engine.core.Checks;
import dev.runoff.engine.core.Metric;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;
import java.util.Objects;

/**
 * The true arms of a planned or simulated experiment: Bernoulli rates in (0, 1), or Gaussian means with known
 * variances. Arms are named {@code arm1 ... armK}. Several arms may share the largest mean (a simulation with an
 * indifference zone allows it); what needs a unique best arm (the optimal allocation, the characteristic time)
 * says so through {@link #best()}.
 */
public final class ArmModel {
    private final Metric metric;
    private final double[] means;
    private final double[] variances;
    /** Index of the arm with the largest mean, or -1 when several share it. */
    private final int best;

    private ArmModel(Metric metric, double[] means, double[] variances) {
        this.metric = metric;
        this.means = means;
        this.variances = variances;
        this.best = uniqueBestOrNone(means);
    }

    /**
     * Bernoulli arms with the given rates.
     *
     * @param means at least two rates, each in (0, 1)
     */
    public static ArmModel bernoulli(double... means) {
        double[] m = copyAtLeastTwo(means);
        double[] v = new double[m.length];
        for (int a = 0; a < m.length; a++) {
            Checks.inOpenRange("rate of " + name(a), m[a], 0, 1);
            v[a] = m[a] * (1 - m[a]);
        }
        return new ArmModel(Metric.BERNOULLI, m, v);
    }

    /**
     * Gaussian arms with known, possibly different, variances.
     *
     * @param means     at least two finite means
     * @param variances one variance per arm, each {@code > 0}
     */
    public static ArmModel gaussian(double[] means, double[] variances) {
        double[] m = copyAtLeastTwo(means);
        Objects.requireNonNull(variances, "variances");
        if (variances.length != m.length) {
            throw new IllegalArgumentException("variances must have one entry per arm (" + m.length
                    + "), got " + variances.length);
        }
        double[] v = variances.clone();
        for (int a = 0; a < m.length; a++) {
            Checks.finite("mean of " + name(a), m[a]);
            Checks.positive("variance of " + name(a), v[a]);
        }
        return new ArmModel(Metric.VALUE, m, v);
    }

    /**
     * Gaussian arms given by their standard deviations.
     *
     * @param means   at least two finite means
     * @param stddevs one standard deviation per arm, each finite and {@code > 0}
     */
    public static ArmModel gaussianStddevs(double[] means, double[] stddevs) {
        Objects.requireNonNull(stddevs, "stddevs");
        double[] variances = new double[stddevs.length];
        for (int a = 0; a < stddevs.length; a++) {
            Checks.positive("standard deviation of " + name(a), stddevs[a]);
            Checks.finite("standard deviation of " + name(a), stddevs[a]);
            variances[a] = stddevs[a] * stddevs[a];
        }
        return gaussian(means, variances);
    }

    /** Gaussian arms sharing one known variance. */
    public static ArmModel gaussianCommonVariance(double variance, double... means) {
        double[] v = new double[copyAtLeastTwo(means).length];
        Arrays.fill(v, variance);
        return gaussian(means, v);
    }

    private static double[] copyAtLeastTwo(double[] means) {
        Objects.requireNonNull(means, "means");
        if (means.length < 2) {
            throw new IllegalArgumentException("need at least 2 arms, got " + means.length);
        }
        return means.clone();
    }

    private static int uniqueBestOrNone(double[] means) {
        int best = 0;
        for (int a = 1; a < means.length; a++) {
            if (means[a] > means[best]) {
                best = a;
            }
        }
        for (int a = 0; a < means.length; a++) {
            if (a != best && means[a] == means[best]) {
                return -1;
            }
        }
        return best;
    }

    /** {@link Metric#BERNOULLI} or {@link Metric#VALUE} (Gaussian). */
    public Metric metric() {
        return metric;
    }

    /** Number of arms. */
    public int size() {
        return means.length;
    }

    /**
     * Index of the arm with the largest mean.
     *
     * @throws IllegalArgumentException when several arms share the largest mean
     */
    public int best() {
        if (best < 0) {
            int first = -1;
            for (int a = 0; a < means.length; a++) {
                if (means[a] == bestMean()) {
                    if (first >= 0) {
                        throw new IllegalArgumentException(name(first) + " and " + name(a) + " share the best mean "
                                + means[a] + ": the best arm is not unique, so the optimal allocation is undefined;"
                                + " plan with an indifference zone epsilon > 0 instead");
                    }
                    first = a;
                }
            }
        }
        return best;
    }

    /** The name of arm {@code a} (0-based index): {@code "arm" + (a + 1)}. */
    public static String name(int a) {
        return "arm" + (a + 1);
    }

    /** The arm names in order. */
    public List<String> names() {
        List<String> names = new ArrayList<>(means.length);
        for (int a = 0; a < means.length; a++) {
            names.add(name(a));
        }
        return names;
    }

    /** The true means in arm order. */
    public double[] means() {
        return means.clone();
    }

    /** Standard deviation of one outcome of arm {@code a} ({@code sqrt(p (1 - p))} for Bernoulli arms). */
    public double stddev(int a) {
        return Math.sqrt(variances[a]);
    }

    /** The largest true mean. */
    public double bestMean() {
        double top = means[0];
        for (double m : means) {
            top = Math.max(top, m);
        }
        return top;
    }

    /** Whether more than one arm has the largest true mean. */
    public boolean bestIsTied() {
        return best < 0;
    }

    /**
     * Whether picking arm {@code a} is an error: its true mean is more than {@code epsilon} below the best.
     *
     * @param epsilon indifference zone, {@code >= 0}; 0 counts every arm but a best one as an error
     */
    public boolean isWrongPick(int a, double epsilon) {
        return means[a] < bestMean() - epsilon;
    }

    /** Mean of arm {@code a}. */
    public double mean(int a) {
        return means[a];
    }

    /** Variance of one observation of arm {@code a} ({@code mu (1 - mu)} for Bernoulli arms). */
    public double variance(int a) {
        return variances[a];
    }

    /**
     * Pairwise cost between the best arm and arm {@code a} under the given weights (Garivier &amp; Kaufmann
     * 2016, Theorem 1): {@code inf_m [w_best d(mu_best, m) + w_a d(mu_a, m)]}.
     *
     * @param weights one non-negative weight per arm
     * @param a       a suboptimal arm
     */
    public double pairwiseCost(double[] weights, int a) {
        checkWeights(weights);
        checkChallenger(a);
        return pairCost(weights[best()], a, weights[a]);
    }

    /**
     * The expected number of trials per unit of {@code log(1/delta)} when sampling with these weights:
     * {@code T_w = 1 / min_{a != best} pairwiseCost(w, a)} (Garivier &amp; Kaufmann 2016, Theorem 1, with the
     * supremum over w replaced by the given w); infinite when some cost is 0.
     *
     * @param weights one non-negative weight per arm
     */
    public double characteristicTime(double[] weights) {
        checkWeights(weights);
        double min = Double.POSITIVE_INFINITY;
        for (int a = 0; a < means.length; a++) {
            if (a != best()) {
                min = Math.min(min, pairCost(weights[best()], a, weights[a]));
            }
        }
        return 1.0 / min;
    }

    private void checkWeights(double[] weights) {
        Objects.requireNonNull(weights, "weights");
        if (weights.length != means.length) {
            throw new IllegalArgumentException("weights must have one entry per arm (" + means.length
                    + "), got " + weights.length);
        }
        for (int a = 0; a < weights.length; a++) {
            Checks.nonNegative("weight of arm " + a, weights[a]);
        }
    }

    private void checkChallenger(int a) {
        if (a < 0 || a >= means.length || a == best()) {
            throw new IllegalArgumentException("arm must be a suboptimal arm index in [0, " + means.length
                    + ") other than the best arm " + best() + ", got " + a);
        }
    }

    /** Pairwise cost between the best arm (weight wBest) and arm a (weight wA). */
    double pairCost(double wBest, int a, double wA) {
        if (metric == Metric.BERNOULLI) {
            return Divergence.bernoulliPairCost(means[best()], wBest, means[a], wA);
        }
        return Divergence.gaussianPairCost(means[best()], variances[best()], wBest, means[a], variances[a], wA);
    }

    /** The common mean m minimising the pairwise cost of the best arm (weight 1) and arm a (weight x). */
    double pairMean(int a, double x) {
        if (metric == Metric.BERNOULLI) {
            return Divergence.bernoulliPairMean(means[best()], 1, means[a], x);
        }
        return Divergence.gaussianPairMean(means[best()], variances[best()], 1, means[a], variances[a], x);
    }

    /** KL divergence from arm {@code arm}'s distribution to the one of the same family with mean m. */
    double divergence(int arm, double m) {
        if (metric == Metric.BERNOULLI) {
            return Divergence.bernoulli(means[arm], m);
        }
        return Divergence.gaussian(means[arm], m, variances[arm]);
    }

    @Override
    public boolean equals(Object o) {
        return o instanceof ArmModel m && metric == m.metric && Arrays.equals(means, m.means)
                && Arrays.equals(variances, m.variances);
    }

    @Override
    public int hashCode() {
        return Objects.hash(metric, Arrays.hashCode(means), Arrays.hashCode(variances));
    }

    @Override
    public String toString() {
        return "ArmModel[" + metric + ", means=" + Arrays.toString(means) + ", variances="
                + Arrays.toString(variances) + "]";
    }
}
