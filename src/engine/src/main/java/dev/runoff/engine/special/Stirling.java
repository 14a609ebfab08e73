package dev.runoff.engine.special;

/** Stirling-series helpers for the large-shape form of the incomplete beta kernel. */
final class Stirling {
    /** Coefficients B_{2k} / (2k (2k - 1)) of the Stirling series, k = 1..8 (Abramowitz and Stegun 6.1.40). */
    private static final double[] SERIES = {
        1.0 / 12, -1.0 / 360, 1.0 / 1260, -1.0 / 1680, 1.0 / 1188, -691.0 / 360360, 1.0 / 156,
        -3617.0 / 122400,
    };
    private static final int RLOG1_TERMS = 60;

    private Stirling() {
    }

    /**
     * {@code delta(x) = log Gamma(x) - ((x - 1/2) log x - x + log sqrt(2 pi))} for {@code x >= 8}, by the
     * Stirling series (Abramowitz and Stegun 1964, eq. 6.1.40); the truncation error is below 1e-15 there.
     */
    static double delta(double x) {
        double inv = 1 / x;
        double inv2 = inv * inv;
        double sum = 0;
        for (int k = SERIES.length - 1; k >= 0; k--) {
            sum = sum * inv2 + SERIES[k];
        }
        return sum * inv;
    }

    /** {@code delta(a) + delta(b) - delta(a + b)}, the correction term BCORR of DiDonato and Morris (1992). */
    static double betaCorrection(double a, double b) {
        return delta(a) + delta(b) - delta(a + b);
    }

    /**
     * {@code e - log(1 + e)} for {@code |e| <= 0.6} without cancellation. With {@code r = e / (2 + e)},
     * {@code log(1 + e) = 2 atanh(r)} and {@code e - 2r = r e}, so the value is
     * {@code r e - 2 (r^3/3 + r^5/5 + ...)}; every term is of order {@code r^2} or smaller. The divisor
     * {@code 2k + 1} is carried as a double, exact and so the same bits as the integer, but without a
     * conversion per term (see {@code IncompleteBeta}'s continued fraction).
     */
    static double rlog1(double e) {
        double r = e / (2 + e);
        double r2 = r * r;
        double term = r * r2;
        double series = 0;
        double odd = 1;
        for (int k = 1; k <= RLOG1_TERMS; k++) {
            odd += 2;
            double add = term / odd;
            series += add;
            if (Math.abs(add) <= 1e-17 * Math.abs(series)) {
                break;
            }
            term *= r2;
        }
        return r * e - 2 * series;
    }
}
