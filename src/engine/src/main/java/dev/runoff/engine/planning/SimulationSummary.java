package dev.runoff.engine.planning;

import dev.runoff.engine.core.Checks;
import dev.runoff.engine.allocation.AllocationMethod;
import java.util.Arrays;
import java.util.List;
import java.util.Objects;
import org.apache.commons.math3.distribution.BetaDistribution;

/**
 * What the runs of one allocation rule add up to.
 *
 * <p>Runs that ended on the trial budget count with their trials at the budget (so the trial figures are
 * then lower bounds of what the rule would have needed) and with their pick, the arm with the largest alpha,
 * in the error count. The median is the mean of the two middle values for an even number of runs; the 90th
 * percentile is the nearest-rank one, the {@code ceil(0.9 n)}-th smallest value. Arm shares pool all runs:
 * each arm's trials over all runs divided by all trials of all runs.
 *
 * @param rule          the allocation rule
 * @param replications  number of runs
 * @param meanTrials    mean trials to stop
 * @param medianTrials  median trials to stop
 * @param p90Trials     90th percentile of the trials to stop
 * @param errors        runs whose pick is wrong
 * @param errorInterval 95% Clopper-Pearson interval for the error probability
 * @param budgetStops   runs that ended on the trial budget
 * @param armShares     share of all trials that went to each arm, in arm order
 */
public record SimulationSummary(AllocationMethod rule, int replications, double meanTrials, double medianTrials,
                                long p90Trials, int errors, Interval errorInterval, int budgetStops,
                                double[] armShares) {

    /** Confidence level of {@link #errorInterval()}. */
    public static final double LEVEL = 0.95;

    /** Copies the shares so the value stays immutable. */
    public SimulationSummary {
        Objects.requireNonNull(rule, "rule");
        Objects.requireNonNull(errorInterval, "errorInterval");
        armShares = armShares.clone();
    }

    /**
     * Summarises runs, in the given order.
     *
     * @param rule the rule that produced them
     * @param runs at least one run
     */
    public static SimulationSummary of(AllocationMethod rule, List<SimulationRun> runs) {
        int n = runs.size();
        if (n < 1) {
            throw new IllegalArgumentException("need at least one run, got " + n);
        }
        long[] trials = new long[n];
        long[] armTrials = new long[runs.get(0).armTrials().length];
        int errors = 0;
        int budget = 0;
        for (int r = 0; r < n; r++) {
            SimulationRun run = runs.get(r);
            trials[r] = run.trials();
            long[] perArm = run.armTrials();
            for (int a = 0; a < armTrials.length; a++) {
                armTrials[a] += perArm[a];
            }
            errors += run.wrong() ? 1 : 0;
            budget += run.budgetStop() ? 1 : 0;
        }
        Arrays.sort(trials);
        return new SimulationSummary(rule, n, mean(trials), median(trials), percentile(trials, 0.9), errors,
                Interval.clopperPearson(errors, n, LEVEL), budget, shares(armTrials));
    }

    /** Observed error rate, errors / replications. */
    public double errorRate() {
        return (double) errors / replications;
    }

    @Override
    public double[] armShares() {
        return armShares.clone();
    }

    private static double mean(long[] x) {
        double sum = 0;
        for (long v : x) {
            sum += v;
        }
        return sum / x.length;
    }

    private static double median(long[] sorted) {
        int n = sorted.length;
        return (sorted[(n - 1) / 2] + (double) sorted[n / 2]) / 2;
    }

    /** Nearest-rank percentile of sorted values: the {@code ceil(p n)}-th smallest. */
    static long percentile(long[] sorted, double p) {
        int rank = (int) Math.ceil(p * sorted.length);
        return sorted[Math.max(rank, 1) - 1];
    }

    private static double[] shares(long[] armTrials) {
        double total = 0;
        for (long t : armTrials) {
            total += t;
        }
        double[] s = new double[armTrials.length];
        for (int a = 0; a < s.length; a++) {
            s[a] = total == 0 ? 0 : armTrials[a] / total;
        }
        return s;
    }

    @Override
    public boolean equals(Object o) {
        return o instanceof SimulationSummary s && rule == s.rule && replications == s.replications
                && Double.compare(meanTrials, s.meanTrials) == 0 && Double.compare(medianTrials, s.medianTrials) == 0
                && p90Trials == s.p90Trials && errors == s.errors && errorInterval.equals(s.errorInterval)
                && budgetStops == s.budgetStops && Arrays.equals(armShares, s.armShares);
    }

    @Override
    public int hashCode() {
        return Objects.hash(rule, replications, meanTrials, medianTrials, p90Trials, errors, errorInterval,
                budgetStops) * 31 + Arrays.hashCode(armShares);
    }

    @Override
    public String toString() {
        return "SimulationSummary[rule=" + rule.cliName() + ", replications=" + replications + ", meanTrials="
                + meanTrials + ", medianTrials=" + medianTrials + ", p90Trials=" + p90Trials + ", errors=" + errors
                + ", errorInterval=" + errorInterval + ", budgetStops=" + budgetStops + ", armShares="
                + Arrays.toString(armShares) + "]";
    }

    /**
     * A two-sided confidence interval for a binomial proportion.
     *
     * @param lower lower end
     * @param upper upper end
     * @param level confidence level, in (0, 1)
     */
    public record Interval(double lower, double upper, double level) {
        private static final double QUANTILE_ACCURACY = 1e-12;

        /**
         * The Clopper-Pearson ("exact") interval for {@code x} successes in {@code n} trials (Clopper &amp;
         * Pearson 1934, "The use of confidence or fiducial limits illustrated in the case of the binomial",
         * Biometrika 26): the ends are quantiles of Beta distributions,
         * {@code lower = B(a/2; x, n - x + 1)} (0 when x = 0) and {@code upper = B(1 - a/2; x + 1, n - x)}
         * (1 when x = n), with {@code a = 1 - level}. Its coverage is at least the level for every p.
         *
         * @param x     successes, in [0, n]
         * @param n     trials, {@code >= 1}
         * @param level confidence level, in (0, 1)
         */
        public static Interval clopperPearson(int x, int n, double level) {
            if (n < 1 || x < 0 || x > n) {
                throw new IllegalArgumentException("need 0 <= x <= n and n >= 1, got x = " + x + ", n = " + n);
            }
            Checks.inOpenRange("level", level, 0, 1);
            double tail = (1 - level) / 2;
            double lower = x == 0 ? 0 : quantile(x, n - x + 1.0, tail);
            double upper = x == n ? 1 : quantile(x + 1.0, n - x, 1 - tail);
            return new Interval(lower, upper, level);
        }

        private static double quantile(double a, double b, double p) {
            return new BetaDistribution(null, a, b, QUANTILE_ACCURACY).inverseCumulativeProbability(p);
        }
    }
}
