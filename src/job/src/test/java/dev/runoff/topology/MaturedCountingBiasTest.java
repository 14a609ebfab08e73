package dev.runoff.topology;

import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.runoff.engine.best.ExactProbabilityBest;
import dev.runoff.engine.posterior.BetaPosterior;
import java.util.ArrayList;
import java.util.List;
import java.util.PriorityQueue;
import java.util.SplittableRandom;
import org.junit.jupiter.api.Test;

/**
 * The claim of {@link UnitCounting}'s design: counting a unit only once its conversion window has closed is
 * unbiased under allocation that shifts traffic between arms, and per-exposure (immediate) counting is not.
 *
 * <p>Each of 200 seeded simulated experiments has two arms with the same true conversion probability within
 * the window, conversions delayed uniformly within the window, and traffic that shifts from arm a (80% of the
 * units in the first half) to arm b (80% in the second half), as adaptive weights do. Every unit goes through
 * {@link UnitCounting}, the code the topology runs; at the decision time the test takes the Beta(1, 1)
 * posterior mean of each arm and P(a best) from the engine.
 *
 * <p>Tolerance: by the central limit theorem the mean of 200 independent differences lies within 4 standard
 * errors (sample standard deviation / sqrt(200)) of its expectation except with probability about 6e-5
 * (two-sided normal tail at 4, from memory). Under equal rates the expected difference is 0 up to the
 * prior's pull (below 1e-4 here); and P(a best) is the posterior probability of the null's coin flip, whose
 * mean over experiments is 0.5 by symmetry of the matured counts' distribution. The same simulation with
 * per-exposure counting must be outside those bounds, so the test can fail.
 */
class MaturedCountingBiasTest {

    private static final int EXPERIMENTS = 200;
    private static final int UNITS = 4_000;
    private static final long WINDOW = 500;
    private static final double RATE = 0.2;
    private static final double Z = 4.0;

    @Test
    void unitCountingCentresOnNoDifferenceAndPBestDoesNotDrift() {
        Summary matured = simulate(true);
        assertTrue(Math.abs(matured.meanDifference()) <= Z * matured.differenceError(),
                "posterior mean difference " + matured.meanDifference() + " beyond " + Z + " standard errors "
                        + matured.differenceError());
        assertTrue(Math.abs(matured.meanPBest() - 0.5) <= Z * matured.pBestError(),
                "mean P(a best) " + matured.meanPBest() + " drifts from 0.5 by more than " + Z + " x "
                        + matured.pBestError());
    }

    @Test
    void perExposureCountingShowsTheBiasAgainstTheRecentlyFedArm() {
        Summary immediate = simulate(false);
        assertTrue(immediate.meanDifference() > Z * immediate.differenceError(),
                "per-exposure counting should favour arm a, fed early: mean difference "
                        + immediate.meanDifference() + ", standard error " + immediate.differenceError());
        assertTrue(immediate.meanPBest() - 0.5 > Z * immediate.pBestError(),
                "per-exposure counting should push P(a best) up: " + immediate.meanPBest());
    }

    private static Summary simulate(boolean unitLevel) {
        double[] differences = new double[EXPERIMENTS];
        double[] pBest = new double[EXPERIMENTS];
        for (int e = 0; e < EXPERIMENTS; e++) {
            long[][] counts = experiment(new SplittableRandom(1_000 + e), unitLevel);
            BetaPosterior a = new BetaPosterior(1 + counts[0][1], 1 + counts[0][0] - counts[0][1]);
            BetaPosterior b = new BetaPosterior(1 + counts[1][1], 1 + counts[1][0] - counts[1][1]);
            differences[e] = a.mean() - b.mean();
            pBest[e] = new ExactProbabilityBest().estimate(List.of(a, b), 0L).alpha(0);
        }
        return new Summary(mean(differences), error(differences), mean(pBest), error(pBest));
    }

    /** Trials and successes of arms a and b at the decision time, after every unit went through the rule. */
    private static long[][] experiment(SplittableRandom random, boolean unitLevel) {
        long decisionAt = UNITS;
        long[][] counts = new long[2][2];
        List<UnitState> units = new ArrayList<>();
        PriorityQueue<long[]> conversions = new PriorityQueue<>((x, y) -> Long.compare(x[0], y[0]));
        for (int t = 0; t < UNITS; t++) {
            deliver(conversions, units, t, counts);
            double shareA = t < UNITS / 2 ? 0.8 : 0.2;
            String arm = random.nextDouble() < shareA ? "a" : "b";
            UnitCounting.Step step = UnitCounting.expose(null, arm, 1, unitLevel, t, WINDOW, t);
            add(counts, arm, step.count());
            units.add(step.unit());
            if (random.nextDouble() < RATE) {
                conversions.add(new long[] {t + random.nextLong(WINDOW + 1), units.size() - 1});
            }
        }
        deliver(conversions, units, decisionAt, counts);
        for (UnitState unit : units) {
            add(counts, unit.arm(), UnitCounting.close(unit, decisionAt, decisionAt).count());
        }
        return counts;
    }

    /** Conversions that happened by {@code now}, through the rule. */
    private static void deliver(PriorityQueue<long[]> conversions, List<UnitState> units, long now,
                                long[][] counts) {
        while (!conversions.isEmpty() && conversions.peek()[0] <= now) {
            long[] conversion = conversions.poll();
            int index = (int) conversion[1];
            UnitCounting.Step step = UnitCounting.convert(units.get(index), conversion[0], true, conversion[0]);
            units.set(index, step.unit());
            add(counts, step.unit().arm(), step.count());
        }
    }

    private static void add(long[][] counts, String arm, UnitCounting.Count count) {
        int i = arm.equals("a") ? 0 : 1;
        counts[i][0] += count.trials();
        counts[i][1] += count.successes();
    }

    private static double mean(double[] xs) {
        double sum = 0;
        for (double x : xs) {
            sum += x;
        }
        return sum / xs.length;
    }

    /** Standard error of the mean: sample standard deviation over sqrt(n). */
    private static double error(double[] xs) {
        double m = mean(xs);
        double ss = 0;
        for (double x : xs) {
            ss += (x - m) * (x - m);
        }
        return Math.sqrt(ss / (xs.length - 1)) / Math.sqrt(xs.length);
    }

    private record Summary(double meanDifference, double differenceError, double meanPBest, double pBestError) {
    }
}
