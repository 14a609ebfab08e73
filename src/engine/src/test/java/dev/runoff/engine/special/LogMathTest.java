package dev.runoff.engine.special;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import org.junit.jupiter.api.Test;

class LogMathTest {

    @Test
    void log1mExpMatchesTheDirectFormulaWhereThatIsSafe() {
        for (double t = -0.01; t > -3; t *= 1.3) {
            double direct = Math.log(1 - Math.exp(t));
            assertEquals(direct, LogMath.log1mExp(t), 1e-12 * Math.abs(direct), "t=" + t);
        }
    }

    @Test
    void log1mExpKeepsRelativeAccuracyNearZero() {
        // log(1 - e^t) = log(-t) + log(1 + t/2 + t^2/6 + ...) for small |t| (Taylor series of expm1);
        // the direct formula would round 1 - e^t to a few digits (Maechler 2012).
        double t = -1e-20;
        assertEquals(Math.log(1e-20), LogMath.log1mExp(t), 1e-15 * 46);
        double t2 = -1e-6;
        double expected = Math.log(1e-6) + Math.log1p(-0.5e-6 + 1e-12 / 6);
        assertEquals(expected, LogMath.log1mExp(t2), 1e-15 * Math.abs(expected));
    }

    @Test
    void log1mExpKeepsRelativeAccuracyFarOut() {
        // log(1 - e^t) = -e^t - e^{2t}/2 - ... for very negative t (series of log1p).
        double t = -50;
        double e = Math.exp(t);
        assertEquals(-e - e * e / 2, LogMath.log1mExp(t), 1e-15 * e);
        assertTrue(LogMath.log1mExp(-800) == 0);
        assertEquals(Double.NEGATIVE_INFINITY, LogMath.log1mExp(0));
        assertTrue(Double.isNaN(LogMath.log1mExp(0.5)));
    }
}
