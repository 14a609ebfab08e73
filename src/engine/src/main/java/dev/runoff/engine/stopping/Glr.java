package dev.runoff.engine.stopping;

import dev.runoff.engine.core.Arm;
import dev.runoff.engine.core.Metric;
import dev.runoff.engine.stats.ArmStats;
import dev.runoff.engine.stats.BernoulliStats;
import dev.runoff.engine.stats.ValueStats;
import java.util.List;
import java.util.Objects;
import java.util.function.ToDoubleBiFunction;

/**
 * The GLR (Chernoff) statistic of Garivier &amp; Kaufmann (2016), "Optimal Best Arm Identification with
 * Fixed Confidence", COLT, section 3: with the empirical leader a (largest empirical mean),
 * {@code Z(t) = min_{b != a} Z_{a,b}(t)}, where {@code Z_{a,b} = N_a d(mu_a, mu_ab) + N_b d(mu_b, mu_ab)} for
 * {@code mu_a >= mu_b} and {@code mu_ab} is the count-weighted mean of the two empirical means.
 *
 * <p>Bernoulli arms: d is the Bernoulli KL divergence. Value arms: d is the Gaussian KL divergence with the
 * variance of each arm replaced by its sample variance (n - 1 denominator), which gives
 * {@code Z_{a,b} = (mu_a - mu_b)^2 / (2 (s_a^2 / N_a + s_b^2 / N_b))}. The proven thresholds are for known
 * variances; with this plug-in the guarantee is approximate (good once each arm has many observations).
 *
 * <p>Where the statistic is undefined the pair contributes 0 (no evidence): an arm without trials, a value
 * arm with fewer than {@link #MIN_VALUE_OBSERVATIONS} observations, or a value pair whose sample variances
 * are both 0.
 */
public final class Glr {
    /**
     * Observations each value arm needs before its pair carries evidence. The threshold is proven for known
     * variances; with sample variances from a handful of observations the plug-in statistic is far too
     * large too often (issue 14: near-tied arms allowed to stop from n = 2 picked the wrong arm in 1.5% of
     * runs at delta = 0.001). Measured with exactly tied N(0, 1) arms, round robin, delta = 0.001, 4,000
     * runs of at most 200 observations per arm: stops (half of them wrong) in 122 runs from n = 2, 2 from
     * n = 5, 0 from n = 10, 20 and 30. Ten is a measured choice, NOT a proven guarantee for unknown
     * variances (see src/docs/planning-and-stopping.md); {@link Rule#SEQUENTIAL_T} is the rule proven for them.
     */
    public static final int MIN_VALUE_OBSERVATIONS = 10;

    private Glr() {
    }

    /**
     * The statistic for these arms.
     *
     * @param arms at least two arms whose statistics are all Bernoulli or all value statistics
     */
    public static Statistic statistic(List<Arm> arms) {
        Metric metric = metricOf(arms);
        return minOverChallengers(arms, metric, empiricalLeader(arms, metric), (a, b) -> pair(metric, a, b));
    }

    /**
     * {@code min_{b != leader} pair(leader, b)} with the arm attaining it (the first on ties) and the total
     * trials: the shape shared by the GLR, mixture and sequential-t statistics. A pair whose statistic is NaN
     * (undefined) carries no evidence: it counts as 0, so it can never let the rule stop.
     */
    static Statistic minOverChallengers(List<Arm> arms, Metric metric, int leader,
                                        ToDoubleBiFunction<ArmStats, ArmStats> pair) {
        int challenger = -1;
        double min = Double.POSITIVE_INFINITY;
        long total = 0;
        for (int b = 0; b < arms.size(); b++) {
            total = Math.addExact(total, arms.get(b).stats().trials());
            if (b == leader) {
                continue;
            }
            double z = pair.applyAsDouble(arms.get(leader).stats(), arms.get(b).stats());
            if (Double.isNaN(z)) {
                z = 0;
            }
            if (z < min) {
                min = z;
                challenger = b;
            }
        }
        return new Statistic(metric, leader, challenger, min, total);
    }

    /**
     * The metric shared by all arms.
     *
     * @throws IllegalArgumentException with fewer than 2 arms or mixed statistics
     */
    public static Metric metricOf(List<Arm> arms) {
        Objects.requireNonNull(arms, "arms");
        if (arms.size() < 2) {
            throw new IllegalArgumentException("need at least 2 arms, got " + arms.size());
        }
        Metric first = metricOf(arms.get(0));
        for (Arm arm : arms) {
            if (metricOf(arm) != first) {
                throw new IllegalArgumentException("arm '" + arm.name() + "' has " + metricOf(arm)
                        + " statistics but arm '" + arms.get(0).name() + "' has " + first);
            }
        }
        return first;
    }

    private static Metric metricOf(Arm arm) {
        return arm.stats() instanceof BernoulliStats ? Metric.BERNOULLI : Metric.VALUE;
    }

    /** Arm with the largest empirical mean among arms with trials (lowest index on ties; 0 if none). */
    static int empiricalLeader(List<Arm> arms, Metric metric) {
        int leader = -1;
        for (int a = 0; a < arms.size(); a++) {
            ArmStats s = arms.get(a).stats();
            if (s.trials() > 0 && (leader < 0 || mean(s) > mean(arms.get(leader).stats()))) {
                leader = a;
            }
        }
        return Math.max(leader, 0);
    }

    private static double mean(ArmStats s) {
        return s instanceof BernoulliStats b ? b.rate() : ((ValueStats) s).mean();
    }

    private static double pair(Metric metric, ArmStats a, ArmStats b) {
        if (metric == Metric.BERNOULLI) {
            BernoulliStats x = (BernoulliStats) a;
            BernoulliStats y = (BernoulliStats) b;
            if (x.trials() == 0 || y.trials() == 0) {
                return 0.0;
            }
            return Divergence.bernoulliPairCost(x.rate(), x.trials(), y.rate(), y.trials());
        }
        ValueStats x = (ValueStats) a;
        ValueStats y = (ValueStats) b;
        if (x.count() < MIN_VALUE_OBSERVATIONS || y.count() < MIN_VALUE_OBSERVATIONS || (x.m2() == 0 && y.m2() == 0)) {
            return 0.0;
        }
        return Divergence.gaussianPairCost(x.mean(), x.sampleVariance(), x.count(),
                y.mean(), y.sampleVariance(), y.count());
    }

    /**
     * A GLR statistic with the arms behind it.
     *
     * @param metric     the arms' metric
     * @param leader     index of the empirical leader
     * @param challenger index of the arm attaining the minimum (the closest challenger)
     * @param value      {@code Z(t)}
     * @param trials     t, total trials over all arms
     */
    public record Statistic(Metric metric, int leader, int challenger, double value, long trials) {
    }
}
