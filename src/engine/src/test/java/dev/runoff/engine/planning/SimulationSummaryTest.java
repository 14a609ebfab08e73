package dev.runoff.engine.planning;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;

import dev.runoff.engine.allocation.AllocationMethod;
import dev.runoff.engine.stopping.VerdictReason;
import java.util.ArrayList;
import java.util.List;
import org.apache.commons.math3.distribution.BinomialDistribution;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.CsvSource;

class SimulationSummaryTest {

    private static SimulationRun run(long trials, boolean wrong, VerdictReason reason, long... armTrials) {
        return new SimulationRun(trials, 0, wrong, reason, armTrials, new double[armTrials.length]);
    }

    @ParameterizedTest
    @CsvSource({"10, 0.95", "50, 0.95", "200, 0.9", "1000, 0.99"})
    void clopperPearsonWithNoErrorsHasTheClosedFormUpperEnd(int n, double level) {
        // Clopper & Pearson (1934): for x = 0 the upper end solves (1 - p)^n = a/2, so p = 1 - (a/2)^(1/n);
        // e.g. 0.3085 for n = 10 at 95%.
        SimulationSummary.Interval i = SimulationSummary.Interval.clopperPearson(0, n, level);
        assertEquals(0.0, i.lower(), 0.0);
        assertEquals(1 - Math.pow((1 - level) / 2, 1.0 / n), i.upper(), 1e-10);
        // and for x = n, symmetrically, the lower end is (a/2)^(1/n)
        SimulationSummary.Interval all = SimulationSummary.Interval.clopperPearson(n, n, level);
        assertEquals(Math.pow((1 - level) / 2, 1.0 / n), all.lower(), 1e-10);
        assertEquals(1.0, all.upper(), 0.0);
    }

    @ParameterizedTest
    @CsvSource({"1, 10", "3, 200", "17, 40", "120, 1000"})
    void clopperPearsonEndsPutHalfOfTheMissingLevelInEachBinomialTail(int x, int n) {
        // Definition of the interval (Clopper & Pearson 1934), checked with Commons Math's binomial
        // distribution: P(X >= x | p = lower) = P(X <= x | p = upper) = (1 - level) / 2.
        SimulationSummary.Interval i = SimulationSummary.Interval.clopperPearson(x, n, 0.95);
        double upperTail = 1 - new BinomialDistribution(null, n, i.lower()).cumulativeProbability(x - 1);
        double lowerTail = new BinomialDistribution(null, n, i.upper()).cumulativeProbability(x);
        assertEquals(0.025, upperTail, 1e-9);
        assertEquals(0.025, lowerTail, 1e-9);
    }

    @Test
    void clopperPearsonRejectsImpossibleCounts() {
        assertThrows(IllegalArgumentException.class, () -> SimulationSummary.Interval.clopperPearson(3, 2, 0.95));
        assertThrows(IllegalArgumentException.class, () -> SimulationSummary.Interval.clopperPearson(0, 0, 0.95));
        assertThrows(IllegalArgumentException.class, () -> SimulationSummary.Interval.clopperPearson(0, 5, 1.0));
    }

    @Test
    void nearestRankPercentileAndMedianOfTenRuns() {
        // Nearest-rank percentile (common practice): the ceil(p n)-th smallest value; the median of an even
        // count is the mean of the two middle values.
        List<SimulationRun> runs = new ArrayList<>();
        for (long t = 10; t >= 1; t--) {
            runs.add(run(t * 100, false, VerdictReason.GLR, t * 100, 0));
        }
        SimulationSummary s = SimulationSummary.of(AllocationMethod.UNIFORM, runs);
        assertEquals(550.0, s.meanTrials(), 0.0);
        assertEquals(550.0, s.medianTrials(), 0.0);
        assertEquals(900, s.p90Trials());
        assertEquals(1000, SimulationSummary.percentile(new long[] {1000}, 0.9));
        assertEquals(18, SimulationSummary.percentile(new long[] {1, 2, 3, 4, 5, 6, 7, 8, 9, 10, 11, 12, 13, 14, 15,
            16, 17, 18, 19, 20}, 0.9));
    }

    @Test
    void budgetStopsCountWithTheirPickAndSharesPoolAllRuns() {
        List<SimulationRun> runs = List.of(run(100, false, VerdictReason.GLR, 60, 40), run(500, true, VerdictReason.BUDGET, 100, 400),
                run(300, true, VerdictReason.GLR, 150, 150));
        SimulationSummary s = SimulationSummary.of(AllocationMethod.TOP_TWO_THOMPSON, runs);
        assertEquals(3, s.replications());
        assertEquals(2, s.errors());
        assertEquals(2.0 / 3, s.errorRate(), 1e-15);
        assertEquals(1, s.budgetStops());
        assertEquals(300.0, s.medianTrials(), 0.0);
        assertArrayEquals(new double[] {310.0 / 900, 590.0 / 900}, s.armShares(), 1e-15);
        assertEquals(SimulationSummary.Interval.clopperPearson(2, 3, 0.95), s.errorInterval());
    }
}
