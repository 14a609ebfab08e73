package dev.runoff.client;

/**
 * The natural logarithm with the same bits as {@link StrictMath#log}, in plain Java arithmetic so that the JIT
 * compiles it inline: on JDK 17 {@code StrictMath.log} is a native call, which made the exponential race of a
 * four-arm pick twice as slow.
 *
 * <p>Design: the algorithm of fdlibm's {@code e_log.c} (Sun Microsystems, 1993), which {@code StrictMath.log}
 * is specified to follow: write {@code x = 2^k (1 + f)} with {@code sqrt(2)/2 < 1 + f < sqrt(2)}, then
 * {@code log(1 + f) = 2s + s R(s^2)} with {@code s = f / (2 + f)} and {@code R} a degree-14 minimax polynomial
 * (coefficients Lg1..Lg7 below), and {@code log(x) = k ln2 + log(1 + f)} with {@code ln2} split in a high and a
 * low part. Java's {@code +}, {@code -}, {@code *} and {@code /} are IEEE 754 round-to-nearest on every JVM
 * since Java 17, so the result is the same everywhere; a test compares it bit for bit with
 * {@code StrictMath.log}. Inputs that are not positive normal finite numbers go to {@code StrictMath.log}.
 */
final class StrictLog {
    private static final double LN2_HI = 6.93147180369123816490e-01;
    private static final double LN2_LO = 1.90821492927058770002e-10;
    private static final double LG1 = 6.666666666666735130e-01;
    private static final double LG2 = 3.999999999940941908e-01;
    private static final double LG3 = 2.857142874366239149e-01;
    private static final double LG4 = 2.222219843214978396e-01;
    private static final double LG5 = 1.818357216161805012e-01;
    private static final double LG6 = 1.531383769920937332e-01;
    private static final double LG7 = 1.479819860511658591e-01;
    private static final double THIRD = 0.33333333333333333;

    private StrictLog() {
    }

    /** {@code StrictMath.log(x)}, bit for bit. */
    static double log(double x) {
        long bits = Double.doubleToRawLongBits(x);
        int high = (int) (bits >>> 32);
        if (high < 0x00100000 || high >= 0x7ff00000) {
            return StrictMath.log(x);
        }
        int fraction = high & 0x000fffff;
        // choose k so that the scaled mantissa 1 + f lies in [sqrt(2)/2, sqrt(2))
        int half = (fraction + 0x95f64) & 0x100000;
        int k = (high >> 20) - 1023 + (half >> 20);
        double scaled = Double.longBitsToDouble((long) (fraction | (half ^ 0x3ff00000)) << 32 | bits & 0xffffffffL);
        double f = scaled - 1.0;
        double dk = k;
        if ((0x000fffff & (2 + fraction)) < 3) {
            return nearOne(f, k, dk);
        }
        double s = f / (2.0 + f);
        double z = s * s;
        double w = z * z;
        double t1 = w * (LG2 + w * (LG4 + w * LG6));
        double t2 = z * (LG1 + w * (LG3 + w * (LG5 + w * LG7)));
        double r = t2 + t1;
        if (((fraction - 0x6147a) | (0x6b851 - fraction)) > 0) {
            double hfsq = 0.5 * f * f;
            return k == 0 ? f - (hfsq - s * (hfsq + r))
                    : dk * LN2_HI - ((hfsq - (s * (hfsq + r) + dk * LN2_LO)) - f);
        }
        return k == 0 ? f - s * (f - r) : dk * LN2_HI - ((s * (f - r) - dk * LN2_LO) - f);
    }

    /** |f| below 2^-20: a short series. */
    private static double nearOne(double f, int k, double dk) {
        if (f == 0) {
            return k == 0 ? 0.0 : dk * LN2_HI + dk * LN2_LO;
        }
        double r = f * f * (0.5 - THIRD * f);
        return k == 0 ? f - r : dk * LN2_HI - ((r - dk * LN2_LO) - f);
    }
}
