package dev.runoff.engine.core;

/**
 * Lower end of the Wilson score interval for a binomial proportion (Wilson 1927, "Probable inference, the
 * law of succession, and statistical inference", JASA 22:209-212; recommended over the Wald interval by
 * Brown, Cai and DasGupta 2001, "Interval estimation for a binomial proportion", Statistical Science 16):
 * <pre>
 *   lower = (p + z^2/(2n) - z sqrt(p(1-p)/n + z^2/(4n^2))) / (1 + z^2/n)
 * </pre>
 * Unlike the Wald bound {@code p - z sqrt(p(1-p)/n)}, which equals p when every draw agrees (p = 1), it stays
 * below 1 at p = 1: there it is {@code n / (n + z^2)}. The upper end is the same expression with the square root
 * added.
 */
public final class WilsonBound {
    private WilsonBound() {
    }

    /**
     * @param p observed proportion in [0, 1]
     * @param n number of trials, {@code >= 1}
     * @param z normal quantile, {@code >= 0}
     * @return the lower end of the Wilson score interval, in [0, p]
     */
    public static double lower(double p, long n, double z) {
        return Math.max(0, Math.min(p, end(p, n, z, -1)));
    }

    /**
     * @param p observed proportion in [0, 1]
     * @param n number of trials, {@code >= 1}
     * @param z normal quantile, {@code >= 0}
     * @return the upper end of the Wilson score interval, in [p, 1]
     */
    public static double upper(double p, long n, double z) {
        return Math.min(1, Math.max(p, end(p, n, z, 1)));
    }

    /** One end: {@code sign} -1 for the lower, +1 for the upper (a negation is exact, so the bits are those of a subtraction). */
    private static double end(double p, long n, double z, double sign) {
        double z2n = z * z / n;
        double centre = p + z2n / 2;
        double spread = z * Math.sqrt(p * (1 - p) / n + z2n / (4.0 * n));
        return (centre + sign * spread) / (1 + z2n);
    }
}
