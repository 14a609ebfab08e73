package dev.runoff.engine.special;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import org.apache.commons.math3.special.Beta;
import org.junit.jupiter.api.Test;

class IncompleteBetaTest {

    private static void assertRelative(double expected, double actual, double tolerance, String what) {
        assertEquals(expected, actual, tolerance * Math.abs(expected), what);
    }

    @Test
    void matchesCommonsMathInTheBody() {
        // Reference: Apache Commons Math 3.6.1 Beta.regularizedBeta (continued fraction, absolute accuracy
        // about 1e-15 in the body, where the values are not small).
        double[][] shapes = {{0.5, 0.5}, {1, 1}, {2, 3}, {10, 90}, {30, 7.5}, {100, 900}, {0.3, 40}};
        for (double[] s : shapes) {
            for (double x = 0.02; x < 1; x += 0.03) {
                double cm = Beta.regularizedBeta(x, s[0], s[1], 1e-16, 100_000);
                if (cm > 1e-3 && cm < 1 - 1e-3) {
                    String what = "I_" + x + "(" + s[0] + ", " + s[1] + ")";
                    assertRelative(cm, Math.exp(IncompleteBeta.logRegularized(x, s[0], s[1])), 1e-12, what);
                    assertRelative(1 - cm, Math.exp(IncompleteBeta.logRegularizedComplement(x, s[0], s[1])),
                            1e-11, what);
                }
            }
        }
    }

    @Test
    void matchesExactBinomialSumsDeepInBothTails() {
        // Reference: I_x(a, n-a+1) = P(Binomial(n, x) >= a), Abramowitz and Stegun 26.5.24, summed in
        // 60-digit decimal arithmetic (ExactBinomial). Values reach 1e-200, far below where 1 - I underflows.
        int[][] shapes = {{3, 5}, {20, 180}, {101, 901}, {400, 600}, {1, 300}, {250, 2}};
        double[] zs = {-30, -12, -6, -2, 0, 2, 6, 12, 30};
        for (int[] s : shapes) {
            IncompleteBeta ib = new IncompleteBeta(s[0], s[1]);
            double mean = s[0] / (double) (s[0] + s[1]);
            double sd = Math.sqrt(mean * (1 - mean) / (s[0] + s[1] + 1));
            for (double z : zs) {
                double x = mean + z * sd;
                if (!(x > 1e-300 && x < 1)) {
                    continue;
                }
                String what = "x=" + x + " a=" + s[0] + " b=" + s[1];
                double lower = ExactBinomial.log(ExactBinomial.regularizedBeta(x, s[0], s[1]));
                double upper = ExactBinomial.log(ExactBinomial.regularizedBetaComplement(x, s[0], s[1]));
                assertEquals(lower, ib.logLower(x, 1 - x), 1e-12 * Math.max(1, Math.abs(lower)), what);
                assertEquals(upper, ib.logUpper(x, 1 - x), 1e-12 * Math.max(1, Math.abs(upper)), what);
            }
        }
    }

    @Test
    void valuesFarBelowTheDoubleRangeKeepTheirLogs() {
        // Same exact reference; here I_x and 1 - I_x are below 1e-308, where only the log can be returned.
        int[][] shapes = {{400, 600}, {600, 400}, {50, 2000}};
        double[][] points = {{0.02, 0.97}, {0.1, 0.98}, {1e-9, 0.4}};
        for (int k = 0; k < shapes.length; k++) {
            int a = shapes[k][0];
            int b = shapes[k][1];
            IncompleteBeta ib = new IncompleteBeta(a, b);
            double low = points[k][0];
            double high = points[k][1];
            double lower = ExactBinomial.log(ExactBinomial.regularizedBeta(low, a, b));
            double upper = ExactBinomial.log(ExactBinomial.regularizedBetaComplement(high, a, b));
            assertTrue(lower < -709 && upper < -709, "not below the double range: " + lower + ", " + upper);
            assertEquals(lower, ib.logLower(low, 1 - low), 1e-12 * Math.abs(lower), "lower a=" + a + " b=" + b);
            assertEquals(upper, ib.logUpper(high, 1 - high), 1e-12 * Math.abs(upper), "upper a=" + a + " b=" + b);
        }
    }

    @Test
    void largeShapesKeepFullAccuracyInTheLogKernel() {
        // a, b = 1e4-scale: the naive a log x + b log(1-x) - log B(a, b) loses about 1e-12 here; the
        // DiDonato-Morris form must agree with the exact binomial sum to 1e-13 relative on the value.
        int a = 3000;
        int b = 27000;
        IncompleteBeta ib = new IncompleteBeta(a, b);
        for (double x : new double[] {0.094, 0.0985, 0.1, 0.1015, 0.106}) {
            double lower = ExactBinomial.log(ExactBinomial.regularizedBeta(x, a, b));
            assertEquals(lower, ib.logLower(x, 1 - x), 1e-13 * Math.max(1, Math.abs(lower)), "x=" + x);
        }
    }

    @Test
    void closedFormsHoldWhereTheValuesUnderflow() {
        // Beta(1, b): I_x = 1 - (1-x)^b; Beta(a, 1): I_x = x^a (integrals of b(1-x)^(b-1) and a x^(a-1)).
        assertRelative(7 * Math.log(1e-100), IncompleteBeta.logRegularized(1e-100, 7, 1), 1e-14, "x^a");
        assertRelative(5000 * Math.log1p(-0.5), IncompleteBeta.logRegularizedComplement(0.5, 1, 5000), 1e-14,
                "(1-x)^b");
        double x = 1e-20;
        double expected = LogMath.log1mExp(300 * Math.log1p(-x));
        assertRelative(expected, IncompleteBeta.logRegularized(x, 1, 300), 1e-13, "1-(1-x)^b near 0");
    }

    @Test
    void theTwoTailsAddUpToOne() {
        // I_x(a, b) + I_{1-x}(b, a) = 1 (A&S 26.5.2).
        double[][] shapes = {{0.7, 3}, {50, 50}, {1e5, 9e5}, {2.5, 1e4}};
        for (double[] s : shapes) {
            IncompleteBeta ib = new IncompleteBeta(s[0], s[1]);
            double mean = s[0] / (s[0] + s[1]);
            for (double f = 0.5; f <= 1.5; f += 0.05) {
                double x = mean * f;
                double sum = Math.exp(ib.logLower(x, 1 - x)) + Math.exp(ib.logUpper(x, 1 - x));
                assertEquals(1.0, sum, 1e-13, "x=" + x);
            }
        }
    }

    @Test
    void endsOfTheUnitIntervalAreExact() {
        IncompleteBeta ib = new IncompleteBeta(2, 3);
        assertEquals(Double.NEGATIVE_INFINITY, ib.logLower(0, 1));
        assertEquals(0.0, ib.logLower(1, 0));
        assertEquals(0.0, ib.logUpper(0, 1));
        assertEquals(Double.NEGATIVE_INFINITY, ib.logUpper(1, 0));
    }

    @Test
    void rejectsBadShapesAndPoints() {
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class, () -> new IncompleteBeta(0, 1));
        assertEquals("incomplete beta a must be a finite number > 0, got 0.0", e.getMessage());
        assertThrows(IllegalArgumentException.class, () -> new IncompleteBeta(1, Double.NaN));
        assertThrows(IllegalArgumentException.class, () -> IncompleteBeta.logRegularized(1.5, 1, 1));
    }
}
