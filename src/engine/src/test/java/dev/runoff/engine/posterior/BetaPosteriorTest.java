package dev.runoff.engine.posterior;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNotEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;

import org.apache.commons.math3.distribution.BetaDistribution;
import org.junit.jupiter.api.Test;

class BetaPosteriorTest {

    private static final double[][] SHAPES = {{0.5, 0.5}, {1, 1}, {2, 3}, {6, 6}, {11, 91}, {101, 901}, {40, 3.5}};

    @Test
    void matchesCommonsMathInTheBody() {
        // Reference: Apache Commons Math 3.6.1 BetaDistribution (density, cdf, inverse cdf).
        for (double[] s : SHAPES) {
            BetaPosterior p = new BetaPosterior(s[0], s[1]);
            BetaDistribution cm = new BetaDistribution(null, s[0], s[1], 1e-14);
            for (double q = 0.01; q < 1; q += 0.049) {
                double x = cm.inverseCumulativeProbability(q);
                String what = p + " x=" + x;
                assertEquals(cm.logDensity(x), p.logDensity(x), 1e-11 * Math.max(1, Math.abs(cm.logDensity(x))), what);
                assertEquals(cm.cumulativeProbability(x), Math.exp(p.logCdf(x)), 1e-12, what);
                assertEquals(1 - cm.cumulativeProbability(x), Math.exp(p.logSurvival(x)), 1e-12, what);
                assertEquals(x, p.quantile(q), 1e-10, what);
            }
        }
    }

    @Test
    void tailsMatchClosedFormsFarBelowUnderflow() {
        // Beta(1, n): F(x) = 1 - (1-x)^n, S(x) = (1-x)^n; Beta(a, 1): F(x) = x^a (integrals of the densities
        // n (1-x)^(n-1) and a x^(a-1)). The values below are far below 1e-308.
        BetaPosterior oneN = new BetaPosterior(1, 2000);
        assertEquals(2000 * Math.log1p(-0.6), oneN.logSurvival(0.6), 1e-12 * 2000);
        assertEquals(Math.log(-Math.expm1(2000 * Math.log1p(-1e-9))), oneN.logCdf(1e-9), 1e-13);
        BetaPosterior aOne = new BetaPosterior(30, 1);
        assertEquals(30 * Math.log(1e-40), aOne.logCdf(1e-40), 1e-13 * 30 * 92);
        assertEquals(Math.log(-Math.expm1(30 * Math.log(0.999))), aOne.logSurvival(0.999), 1e-13);
        assertEquals(Math.log(30) + 29 * Math.log(1e-40), aOne.logDensity(1e-40), 1e-12 * 2700);
    }

    @Test
    void quantilesInvertTheLogTailsFarOut() {
        // Round trip: log F(quantile(p)) = log p, even for p = 1e-250 where a cdf-space solver cannot work.
        for (double[] s : SHAPES) {
            BetaPosterior p = new BetaPosterior(s[0], s[1]);
            for (double prob : new double[] {1e-250, 1e-30, 1e-6, 0.3, 0.75, 1 - 1e-9}) {
                double x = p.quantile(prob);
                double logTail = prob <= 0.5 ? p.logCdf(x) : p.logSurvival(x);
                double target = prob <= 0.5 ? Math.log(prob) : Math.log1p(-prob);
                // plus the change of the log tail over one unit in the last place of x
                double resolution = 2 * Math.ulp(x) * Math.exp(p.logDensity(x) - logTail);
                double slack = 1e-9 * Math.abs(target) + 1e-9 + resolution;
                if (x > 1e-300 && x < 1 - 1e-15) {
                    assertEquals(target, logTail, slack, p + " p=" + prob + " x=" + x);
                }
            }
        }
    }

    @Test
    void densityAtTheEndsFollowsTheShape() {
        assertEquals(Double.POSITIVE_INFINITY, new BetaPosterior(0.5, 2).logDensity(0));
        assertEquals(Math.log(3), new BetaPosterior(1, 3).logDensity(0), 1e-15);
        assertEquals(Double.NEGATIVE_INFINITY, new BetaPosterior(2, 3).logDensity(0));
        assertEquals(Double.NEGATIVE_INFINITY, new BetaPosterior(2, 3).logDensity(1.5));
    }

    @Test
    void valueSemanticsAndAccessors() {
        BetaPosterior p = new BetaPosterior(3, 4);
        assertEquals(3.0, p.a());
        assertEquals(4.0, p.b());
        assertEquals(new BetaPosterior(3, 4), p);
        assertEquals(new BetaPosterior(3, 4).hashCode(), p.hashCode());
        assertNotEquals(new BetaPosterior(4, 3), p);
        assertEquals("BetaPosterior[a=3.0, b=4.0]", p.toString());
        assertEquals(3.0 / 7, p.mean(), 1e-16);
        assertEquals(12.0 / (49 * 8), p.variance(), 1e-16);
    }

    @Test
    void rejectsBadParameters() {
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class, () -> new BetaPosterior(-1, 2));
        assertEquals("Beta posterior a must be a finite number > 0, got -1.0", e.getMessage());
        assertThrows(IllegalArgumentException.class, () -> new BetaPosterior(1, Double.POSITIVE_INFINITY));
        assertThrows(IllegalArgumentException.class, () -> new BetaPosterior(1, 1).quantile(1.0));
    }
}
