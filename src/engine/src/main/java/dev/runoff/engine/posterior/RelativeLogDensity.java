package dev.runoff.engine.posterior;

/**
 * The log density of Beta(a, b), {@code a, b >= 1}, relative to its mode m:
 * {@code h(x) = (a - 1) log(x / m) + (b - 1) log((1 - x) / (1 - m))}, with both logarithms taken as
 * {@code log1p} of a relative difference, so that no normalising constant is needed and large shapes keep
 * their accuracy near the mode. {@code h} is concave and {@code h(m) = 0}. A relative difference that
 * rounding takes below -1 (at an end of the support, where {@code m} and {@code 1 - m} were rounded apart)
 * counts as -1, a log of 0.
 */
final class RelativeLogDensity {
    private final double am1;
    private final double bm1;
    private final double mode;
    private final double modeComplement;

    RelativeLogDensity(double a, double b) {
        this.am1 = a - 1;
        this.bm1 = b - 1;
        double sum = am1 + bm1;
        this.mode = sum == 0 ? 0.5 : am1 / sum;
        this.modeComplement = sum == 0 ? 0.5 : bm1 / sum;
    }

    /** The mode ({@code 1/2} for the uniform Beta(1, 1)). */
    double mode() {
        return mode;
    }

    /** {@code h(x)} for {@code 0 <= x <= 1}; {@code -infinity} at an end where the density vanishes. */
    double at(double x) {
        double v = 0;
        if (am1 != 0) {
            v += am1 * StrictMath.log1p(Math.max(-1.0, (x - mode) / mode));
        }
        if (bm1 != 0) {
            v += bm1 * StrictMath.log1p(Math.max(-1.0, (mode - x) / modeComplement));
        }
        return v;
    }

    /** {@code h'(x) = (a - 1) / x - (b - 1) / (1 - x)}, a term with a zero coefficient left out. */
    double slope(double x) {
        double v = 0;
        if (am1 != 0) {
            v += am1 / x;
        }
        if (bm1 != 0) {
            v -= bm1 / (1 - x);
        }
        return v;
    }
}
