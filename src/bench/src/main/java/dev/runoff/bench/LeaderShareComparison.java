package dev.runoff.bench;

import dev.runoff.engine.EngineConfig;
import dev.runoff.engine.allocation.AllocationMethod;
import dev.runoff.engine.core.Metric;
import dev.runoff.engine.planning.ArmModel;
import dev.runoff.engine.planning.OptimalAllocation;
import dev.runoff.engine.planning.Simulation;
import dev.runoff.engine.planning.SimulationConfig;
import dev.runoff.engine.planning.SimulationRun;
import dev.runoff.engine.stopping.StoppingConfig;
import java.util.List;
import java.util.Locale;

/**
 * Trials of top-two Thompson sampling with the adaptive leader share (TOP_TWO_ADAPTIVE) against beta = 1/2,
 * paired run by run on the same seeds, on the four rate instances of src/docs/planning-and-stopping.md: GLR
 * stopping, delta 0.01, batch 100, budget 20 T* log(1/delta). Prints, per instance, each rule's mean trials
 * (standard error), the mean of the paired ratios adaptive / fixed with its standard error and a normal 95%
 * interval (mean +- 1.96 s.e., common practice), how many runs the adaptive rule needed more, and wrong picks.
 *
 * <p>Run: {@code java -cp ... dev.runoff.bench.LeaderShareComparison [runs] [threads]} (defaults 300, 2).
 */
public final class LeaderShareComparison {
    private static final double DELTA = 0.01;
    private static final double[][] INSTANCES = {
        {0.5, 0.45, 0.43, 0.4}, {0.3, 0.21, 0.2, 0.19, 0.18}, {0.12, 0.1}, {0.1, 0.08, 0.08, 0.06},
    };

    private LeaderShareComparison() {
    }

    /** Prints one line per instance. */
    public static void main(String[] args) {
        int runs = args.length > 0 ? Integer.parseInt(args[0]) : 300;
        int threads = args.length > 1 ? Integer.parseInt(args[1]) : 2;
        for (double[] rates : INSTANCES) {
            System.out.println(row(rates, runs, threads));
        }
    }

    private static String row(double[] rates, int runs, int threads) {
        ArmModel arms = ArmModel.bernoulli(rates);
        double tStar = OptimalAllocation.optimal(arms).characteristicTime();
        long budget = Math.round(20 * tStar * Math.log(1 / DELTA));
        SimulationConfig c = new SimulationConfig(arms, EngineConfig.defaults(Metric.BERNOULLI),
                StoppingConfig.glr(DELTA).withBudgetTrials(budget), 100, runs, 1L, 0.0);
        List<List<SimulationRun>> r = Simulation.pairedRuns(c,
                List.of(AllocationMethod.TOP_TWO_THOMPSON, AllocationMethod.TOP_TWO_ADAPTIVE), threads);
        List<SimulationRun> fixed = r.get(0);
        List<SimulationRun> adaptive = r.get(1);
        double[] ratio = new double[runs];
        int more = 0;
        for (int i = 0; i < runs; i++) {
            ratio[i] = (double) adaptive.get(i).trials() / fixed.get(i).trials();
            more += adaptive.get(i).trials() > fixed.get(i).trials() ? 1 : 0;
        }
        double[] fixedTrials = fixed.stream().mapToDouble(SimulationRun::trials).toArray();
        double[] adaptiveTrials = adaptive.stream().mapToDouble(SimulationRun::trials).toArray();
        double m = mean(ratio);
        double se = standardError(ratio);
        return String.format(Locale.ROOT, "rates %s: T* log(1/delta) %.0f; beta 1/2 %.0f (%.0f); adaptive %.0f (%.0f);"
                        + " adaptive / beta 1/2 paired %.3f (s.e. %.3f, 95%% [%.3f, %.3f]); adaptive more in %d of %d;"
                        + " wrong picks %d and %d; budget stops %d and %d",
                java.util.Arrays.toString(rates), tStar * Math.log(1 / DELTA), mean(fixedTrials),
                standardError(fixedTrials), mean(adaptiveTrials), standardError(adaptiveTrials), m, se,
                m - 1.96 * se, m + 1.96 * se, more, runs, errors(fixed), errors(adaptive), budgetStops(fixed),
                budgetStops(adaptive));
    }

    private static long errors(List<SimulationRun> runs) {
        return runs.stream().filter(SimulationRun::wrong).count();
    }

    private static long budgetStops(List<SimulationRun> runs) {
        return runs.stream().filter(SimulationRun::budgetStop).count();
    }

    private static double mean(double[] x) {
        double s = 0;
        for (double v : x) {
            s += v;
        }
        return s / x.length;
    }

    private static double standardError(double[] x) {
        double m = mean(x);
        double ss = 0;
        for (double v : x) {
            ss += (v - m) * (v - m);
        }
        return Math.sqrt(ss / (x.length - 1) / x.length);
    }
}
