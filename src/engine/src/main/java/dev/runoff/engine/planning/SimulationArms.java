package dev.runoff.engine.planning;

import dev.runoff.engine.core.Checks;
import dev.runoff.engine.core.Metric;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;
import java.util.Objects;

/**
 * The true arms of a simulated experiment: Bernoulli rates, or Normal(mean, stddev) outcomes for a value
 * metric. Unlike {@link ArmModel}, several arms may share the best mean: whether that is acceptable is
 * decided by the caller (an indifference zone makes it so). Arms are named {@code arm1 ... armK}.
 */
public final class SimulationArms {
    private final Metric metric;
    private final double[] means;
    private final double[] stddevs;

    private SimulationArms(Metric metric, double[] means, double[] stddevs) {
        this.metric = metric;
        this.means = means;
        this.stddevs = stddevs;
    }

    /**
     * Bernoulli arms.
     *
     * @param rates at least two success rates, each in (0, 1)
     */
    public static SimulationArms bernoulli(double... rates) {
        double[] m = atLeastTwo(rates);
        double[] s = new double[m.length];
        for (int a = 0; a < m.length; a++) {
            Checks.inOpenRange("rate of " + name(a), m[a], 0, 1);
            s[a] = Math.sqrt(m[a] * (1 - m[a]));
        }
        return new SimulationArms(Metric.BERNOULLI, m, s);
    }

    /**
     * Value arms whose outcomes are Normal(mean, stddev).
     *
     * @param means   at least two finite means
     * @param stddevs one standard deviation per arm, each finite and {@code > 0}
     */
    public static SimulationArms gaussian(double[] means, double[] stddevs) {
        double[] m = atLeastTwo(means);
        Objects.requireNonNull(stddevs, "stddevs");
        if (stddevs.length != m.length) {
            throw new IllegalArgumentException("stddevs must have one entry per arm (" + m.length + "), got "
                    + stddevs.length);
        }
        double[] s = stddevs.clone();
        for (int a = 0; a < m.length; a++) {
            Checks.finite("mean of " + name(a), m[a]);
            Checks.positive("standard deviation of " + name(a), s[a]);
        }
        return new SimulationArms(Metric.VALUE, m, s);
    }

    private static double[] atLeastTwo(double[] means) {
        Objects.requireNonNull(means, "means");
        if (means.length < 2) {
            throw new IllegalArgumentException("need at least 2 arms, got " + means.length);
        }
        return means.clone();
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

    /** Bernoulli or value. */
    public Metric metric() {
        return metric;
    }

    /** Number of arms. */
    public int size() {
        return means.length;
    }

    /** True mean of arm {@code a}. */
    public double mean(int a) {
        return means[a];
    }

    /** The true means in arm order. */
    public double[] means() {
        return means.clone();
    }

    /** Standard deviation of one outcome of arm {@code a} ({@code sqrt(p (1 - p))} for Bernoulli arms). */
    public double stddev(int a) {
        return stddevs[a];
    }

    /** The largest true mean. */
    public double bestMean() {
        double best = means[0];
        for (double m : means) {
            best = Math.max(best, m);
        }
        return best;
    }

    /** Whether more than one arm has the largest true mean. */
    public boolean bestIsTied() {
        double best = bestMean();
        return Arrays.stream(means).filter(m -> m == best).count() > 1;
    }

    /**
     * Whether picking arm {@code a} is an error: its true mean is more than {@code epsilon} below the best.
     *
     * @param epsilon indifference zone, {@code >= 0}; 0 counts every arm but a best one as an error
     */
    public boolean isWrongPick(int a, double epsilon) {
        return means[a] < bestMean() - epsilon;
    }

    /**
     * The planning model of these arms (true variances known).
     *
     * @throws IllegalArgumentException if the best arm is not unique
     */
    public ArmModel model() {
        if (metric == Metric.BERNOULLI) {
            return ArmModel.bernoulli(means);
        }
        double[] variances = new double[stddevs.length];
        for (int a = 0; a < variances.length; a++) {
            variances[a] = stddevs[a] * stddevs[a];
        }
        return ArmModel.gaussian(means, variances);
    }

    @Override
    public boolean equals(Object o) {
        return o instanceof SimulationArms s && metric == s.metric && Arrays.equals(means, s.means)
                && Arrays.equals(stddevs, s.stddevs);
    }

    @Override
    public int hashCode() {
        return Objects.hash(metric, Arrays.hashCode(means), Arrays.hashCode(stddevs));
    }

    @Override
    public String toString() {
        return "SimulationArms[" + metric + ", means=" + Arrays.toString(means) + ", stddevs="
                + Arrays.toString(stddevs) + "]";
    }
}
