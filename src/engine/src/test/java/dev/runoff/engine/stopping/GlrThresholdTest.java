package dev.runoff.engine.stopping;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.runoff.engine.core.Metric;
import org.junit.jupiter.api.Test;

class GlrThresholdTest {

    @Test
    void bernoulliThresholdIsLogOfTwoTTimesKMinusOneOverDelta() {
        // Garivier & Kaufmann (2016), COLT, section 3: beta(t, delta) = log(2 t (K - 1) / delta).
        assertEquals(Math.log(2.0 * 1000 * 2 / 0.05), GlrThreshold.bernoulli(1000, 3, 0.05), 1e-12);
        assertEquals(Math.log(2.0 * 5e6 * 9 / 0.001), GlrThreshold.bernoulli(5_000_000, 10, 0.001), 1e-12);
        // log(80000) = 11.289781913656018 by hand: 4 log 10 + 3 log 2 = 9.21034 + 2.07944.
        assertEquals(11.289781913656018, GlrThreshold.bernoulli(1000, 3, 0.05), 1e-12);
        assertEquals(GlrThreshold.bernoulli(1000, 3, 0.05), GlrThreshold.PROVEN.value(Metric.BERNOULLI, 1000, 3, 0.05));
    }

    @Test
    void gaussianThresholdFollowsTheMixtureMartingaleFormula() {
        // Kaufmann & Koolen (2021), JMLR: 2 C_G(log((K - 1)/delta) / 2) + 4 log(4 + log(t/2)), with C_G
        // recomputed independently in the test.
        for (long t : new long[] {1, 10, 1000, 1_000_000}) {
            for (int k : new int[] {2, 5}) {
                double expected = 2 * GaussianCalibrationTest.cgByGrid(Math.log((k - 1) / 0.05) / 2)
                        + 4 * Math.log(4 + Math.log(t / 2.0));
                assertEquals(expected, GlrThreshold.gaussian(t, k, 0.05), 1e-7, "t=" + t + " K=" + k);
                assertEquals(GlrThreshold.gaussian(t, k, 0.05), GlrThreshold.PROVEN.value(Metric.VALUE, t, k, 0.05));
            }
        }
    }

    @Test
    void lighterThresholdIsLogOfOnePlusLogTOverDeltaAndSaysItIsNotProven() {
        // Garivier & Kaufmann (2016), section 6 experiments: beta(t, delta) = log((log t + 1) / delta).
        assertEquals(Math.log((1 + Math.log(1000)) / 0.05), GlrThreshold.lighterNotProven(1000, 0.05), 1e-12);
        assertEquals(GlrThreshold.lighterNotProven(1000, 0.05),
                GlrThreshold.LIGHTER_NOT_PROVEN.value(Metric.VALUE, 1000, 4, 0.05));
        assertTrue(GlrThreshold.LIGHTER_NOT_PROVEN.toString().contains("NOT PROVEN"));
        assertTrue(GlrThreshold.LIGHTER_NOT_PROVEN.name().contains("NOT_PROVEN"));
        assertTrue(GlrThreshold.lighterNotProven(1000, 0.05) < GlrThreshold.bernoulli(1000, 2, 0.05));
    }

    @Test
    void rejectsBadArgumentsNamingThem() {
        assertEquals("total trials t must be >= 1, got 0", assertThrows(IllegalArgumentException.class,
                () -> GlrThreshold.bernoulli(0, 3, 0.05)).getMessage());
        assertEquals("number of arms must be >= 2, got 1", assertThrows(IllegalArgumentException.class,
                () -> GlrThreshold.gaussian(10, 1, 0.05)).getMessage());
        assertEquals("delta must be in (0.0, 1.0), got 1.0", assertThrows(IllegalArgumentException.class,
                () -> GlrThreshold.lighterNotProven(10, 1.0)).getMessage());
        assertThrows(IllegalArgumentException.class, () -> GlrThreshold.PROVEN.value(Metric.BERNOULLI, 10, 2, 0));
    }
}
