package dev.runoff.audit;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import org.junit.jupiter.api.Test;

class MixtureFitTest {

    @Test
    void oneVectorIsThePlainPearsonStatistic() {
        // Worked by hand (Pearson 1900): 60/40 against 50/50 gives (10^2 + 10^2) / 50 = 4.0.
        MixtureFit.Result fit = MixtureFit.fit(new long[] {60, 40}, new double[][] {{0.5, 0.5}});
        assertEquals(4.0, fit.statistic(), 1e-12);
        assertEquals(0.0, fit.gap(), 1e-12);
        assertEquals(1.0, fit.lambda()[0], 0.0);
    }

    @Test
    void twoVectorsMatchTheGoldenSectionFitOfLagMixture() {
        // The hand-worked case of SampleRatioTest: previous (1/2, 1/2, 0), current (0, 1/2, 1/2), observed
        // (30, 60, 10): least at a previous share of 0.75 with statistic 4.0; LagMixture finds it by golden
        // section on the segment.
        long[] observed = {30, 60, 10};
        double[] previous = {0.5, 0.5, 0.0};
        double[] current = {0.0, 0.5, 0.5};
        MixtureFit.Result fit = MixtureFit.fit(observed, new double[][] {current, previous});
        double lag = LagMixture.fit(observed, previous, current);
        assertEquals(0.75, lag, 1e-8);
        assertEquals(lag, fit.lambda()[1], 1e-6);
        assertEquals(4.0, fit.statistic(), 1e-9);
        assertTrue(fit.lowerBound() <= 4.0 && fit.lowerBound() > 4.0 - 1e-6, fit.toString());
    }

    @Test
    void countsInsideTheHullFitExactly() {
        // Worked by hand: (0.3, 0.3, 0.4) = 0.5 (0.6, 0, 0.4) + 0.5 (0, 0.6, 0.4), so observed (30, 30, 40) has
        // statistic 0 at lambda (0.5, 0.5, 0) whatever the third vector; the certified bound is then near 0.
        double[][] vectors = {{0.6, 0.0, 0.4}, {0.0, 0.6, 0.4}, {0.1, 0.1, 0.8}};
        MixtureFit.Result fit = MixtureFit.fit(new long[] {30, 30, 40}, vectors);
        assertEquals(0.0, fit.statistic(), 1e-6);
        assertEquals(0.5, fit.lambda()[0], 1e-3);
        assertEquals(0.5, fit.lambda()[1], 1e-3);
    }
}
