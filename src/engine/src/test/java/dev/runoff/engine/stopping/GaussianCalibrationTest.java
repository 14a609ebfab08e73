package dev.runoff.engine.stopping;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;

import org.junit.jupiter.api.Test;

class GaussianCalibrationTest {
    private static final int GRID_POINTS = 400;
    private static final double GRID_STEP = 0.5 / GRID_POINTS;
    private static double[] gridG;

    /**
     * Zeta by direct summation of 5000 terms plus the integral of the tail and its first two corrections,
     * independent of the code under test.
     */
    private static double zetaBySummation(double s) {
        int n = 5000;
        double sum = 0;
        for (int k = n - 1; k >= 1; k--) {
            sum += Math.pow(k, -s);
        }
        return sum + Math.pow(n, 1 - s) / (s - 1) + Math.pow(n, -s) / 2 + s * Math.pow(n, -s - 1) / 12;
    }

    private static double g(double lambda) {
        return 2 * lambda - 2 * lambda * Math.log(4 * lambda) + Math.log(zetaBySummation(2 * lambda))
                - 0.5 * Math.log(1 - lambda);
    }

    /** g_G on the grid 1/2 + i/800, i = 1..399, computed once: it does not depend on x. */
    private static synchronized double[] gridG() {
        if (gridG == null) {
            gridG = new double[GRID_POINTS];
            for (int i = 1; i < GRID_POINTS; i++) {
                gridG[i] = g(0.5 + i * GRID_STEP);
            }
        }
        return gridG;
    }

    /** C_G by a 400-point grid over (1/2, 1) refined by golden-section search, independent of the code. */
    static double cgByGrid(double x) {
        double[] grid = gridG();
        int bestI = 1;
        for (int i = 1; i < GRID_POINTS; i++) {
            double lambda = 0.5 + i * GRID_STEP;
            if ((grid[i] + x) / lambda < (grid[bestI] + x) / (0.5 + bestI * GRID_STEP)) {
                bestI = i;
            }
        }
        double a = 0.5 + (bestI - 1) * GRID_STEP;
        double b = Math.min(0.5 + (bestI + 1) * GRID_STEP, 1 - 1e-12);
        double r = (Math.sqrt(5) - 1) / 2;
        double c = b - r * (b - a);
        double d = a + r * (b - a);
        double fc = (g(c) + x) / c;
        double fd = (g(d) + x) / d;
        for (int k = 0; k < 50; k++) {
            if (fc < fd) {
                b = d;
                d = c;
                fd = fc;
                c = b - r * (b - a);
                fc = (g(c) + x) / c;
            } else {
                a = c;
                c = d;
                fc = fd;
                d = a + r * (b - a);
                fd = (g(d) + x) / d;
            }
        }
        double lambda = (a + b) / 2;
        return (g(lambda) + x) / lambda;
    }

    @Test
    void zetaMatchesKnownValues() {
        // zeta(2) = pi^2/6 and zeta(4) = pi^4/90 (Euler); zeta(3) = 1.2020569031595942 (Apery's constant)
        // and zeta(3/2) = 2.612375348685488 (from memory).
        assertEquals(Math.PI * Math.PI / 6, GaussianCalibration.zeta(2), 1e-14);
        assertEquals(Math.pow(Math.PI, 4) / 90, GaussianCalibration.zeta(4), 1e-14);
        assertEquals(1.2020569031595942, GaussianCalibration.zeta(3), 1e-14);
        assertEquals(2.612375348685488, GaussianCalibration.zeta(1.5), 1e-14);
    }

    @Test
    void zetaFollowsItsLaurentExpansionNearOne() {
        // zeta(1 + h) = 1/h + gamma - gamma_1 h + O(h^2), Euler's gamma = 0.5772156649015329 and the Stieltjes
        // constant gamma_1 = -0.0728158454836767 (from memory).
        double h = 1e-3;
        assertEquals(1 / h + 0.5772156649015329 + 0.0728158454836767 * h, GaussianCalibration.zeta(1 + h), 1e-7);
    }

    @Test
    void calibrationMatchesAnIndependentGridMinimisation() {
        // Kaufmann & Koolen (2021), JMLR: C_G(x) = min over lambda in (1/2, 1) of (g_G(lambda) + x) / lambda,
        // recomputed here with its own zeta and its own minimiser.
        for (double x : new double[] {0.0, 0.5, Math.log(2 / 0.05) / 2, 3.0, 10.0, 50.0}) {
            assertEquals(cgByGrid(x), GaussianCalibration.cG(x), 1e-8, "x = " + x);
        }
    }

    @Test
    void rejectsBadArguments() {
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class, () -> GaussianCalibration.zeta(1));
        assertEquals("zeta argument s must be a finite number > 1, got 1.0", e.getMessage());
        assertThrows(IllegalArgumentException.class, () -> GaussianCalibration.cG(-1));
        assertThrows(IllegalArgumentException.class, () -> GaussianCalibration.cG(Double.NaN));
    }
}
