package dev.runoff.engine.core;

import static org.junit.jupiter.api.Assertions.assertEquals;

import org.apache.commons.math3.distribution.NormalDistribution;
import org.apache.commons.math3.stat.interval.ConfidenceInterval;
import org.apache.commons.math3.stat.interval.WilsonScoreInterval;
import org.junit.jupiter.api.Test;

/** Both ends of the Wilson score interval against Commons Math's WilsonScoreInterval (Wilson 1927). */
class WilsonBoundTest {

    @Test
    void bothEndsMatchCommonsMath() {
        // Two-sided level of z = 3, as the posterior rule uses it.
        double level = 1 - 2 * new NormalDistribution().cumulativeProbability(-3);
        int[][] cases = {{1_000, 970}, {10_000, 9_700}, {2_000, 1}, {500, 250}};
        for (int[] c : cases) {
            ConfidenceInterval reference = new WilsonScoreInterval().createInterval(c[0], c[1], level);
            double p = (double) c[1] / c[0];
            assertEquals(reference.getLowerBound(), WilsonBound.lower(p, c[0], 3), 1e-9, c[1] + " of " + c[0]);
            assertEquals(reference.getUpperBound(), WilsonBound.upper(p, c[0], 3), 1e-9, c[1] + " of " + c[0]);
        }
    }

    @Test
    void atNoSuccessesTheUpperEndIsZSquaredOverNPlusZSquared() {
        // Closed form of the Wilson interval at x = 0: [0, z^2 / (n + z^2)] (Brown, Cai and DasGupta 2001, from
        // memory); at n = 1,000 and z = 3: 9 / 1009.
        assertEquals(9.0 / 1009, WilsonBound.upper(0, 1_000, 3), 1e-15);
        assertEquals(0.0, WilsonBound.lower(0, 1_000, 3));
        assertEquals(1_000.0 / 1009, WilsonBound.lower(1, 1_000, 3), 1e-15);
        assertEquals(1.0, WilsonBound.upper(1, 1_000, 3));
    }
}
