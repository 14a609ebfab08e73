package dev.runoff.engine.special;

import static org.junit.jupiter.api.Assertions.assertEquals;

import org.apache.commons.math3.special.Gamma;
import org.junit.jupiter.api.Test;

class StirlingTest {

    @Test
    void stirlingCorrectionMatchesCommonsMathLogGamma() {
        // delta(x) = log Gamma(x) - ((x - 1/2) log x - x + log sqrt(2 pi)); reference: Commons Math 3.6.1
        // Gamma.logGamma. The difference of two numbers of size x log x limits the check to about 1e-13 x.
        for (double x : new double[] {8, 8.5, 13, 40, 250, 3000}) {
            double expected = Gamma.logGamma(x) - ((x - 0.5) * Math.log(x) - x + 0.5 * Math.log(2 * Math.PI));
            assertEquals(expected, Stirling.delta(x), 2e-15 * x * Math.log(x), "x=" + x);
        }
    }

    @Test
    void rlog1MatchesTheDirectFormulaAndItsSeries() {
        // e - log(1 + e): direct where it does not cancel, Taylor series e^2/2 - e^3/3 + e^4/4 - e^5/5 near 0.
        for (double e : new double[] {-0.6, -0.3, 0.2, 0.6}) {
            double direct = e - Math.log1p(e);
            assertEquals(direct, Stirling.rlog1(e), 1e-15 * direct / Math.abs(e), "e=" + e);
        }
        double e = 1e-5;
        double series = e * e / 2 - Math.pow(e, 3) / 3 + Math.pow(e, 4) / 4 - Math.pow(e, 5) / 5;
        assertEquals(series, Stirling.rlog1(e), 1e-15 * series);
    }
}
