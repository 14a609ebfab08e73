package dev.runoff.records;

import java.math.BigInteger;

/**
 * The exact sign of {@code a 2^b - n 10^p} for non-negative {@code a} and {@code n}: the comparison between a
 * binary and a decimal number that {@link CanonicalJson} uses to prove its digits of a double.
 *
 * <p>Why the 128-bit path is exact: {@code n 10^p = n 5^p 2^p}, and multiplying both sides by the positive
 * {@code 2^-p}, then by {@code 5^-p} when {@code p < 0}, then by {@code 2^(p-b)} when {@code b < p}, keeps the
 * sign: the comparison becomes {@code a 5^s 2^u} against {@code n 5^t 2^v} with non-negative integers, one of
 * {@code s, t} and one of {@code u, v} zero. When the power of five fits a {@code long} ({@code 5^27 < 2^63})
 * each side is a product of two values below 2^63, so below 2^126, and the power of two is applied only when
 * the result stays below 2^127: both sides are then exact unsigned 128-bit integers. Otherwise the same
 * comparison runs on {@link BigInteger}, unless the decimal is tiny ({@code p < -27}): then the top 64 bits of
 * the power of five bound the binary side within a 128-bit interval, which decides all but near-ties (see
 * {@link #bounded128}); the tiny probabilities of being best that exact integration gives losing arms take
 * this path.
 */
final class BinaryDecimalSign {

    /** Largest exponent k with 5^k below 2^63. */
    private static final int LONG_FIVE_POWERS = 27;
    private static final long[] FIVES = longFivePowers();
    private static final int MAX_FIVE_POWER = 400;
    private static final BigInteger[] BIG_FIVES = bigFivePowers();
    /** The top 64 bits of 5^k (unsigned, leading bit set) for k > 27, and the power of two they stand for. */
    private static final long[] TOP_FIVES = new long[MAX_FIVE_POWER + 1];
    private static final int[] TOP_FIVES_EXPONENT = new int[MAX_FIVE_POWER + 1];
    /** What a 128-bit path returns when it cannot tell. */
    private static final int UNDECIDED = 2;

    static {
        for (int k = LONG_FIVE_POWERS + 1; k <= MAX_FIVE_POWER; k++) {
            int exponent = BIG_FIVES[k].bitLength() - Long.SIZE;
            TOP_FIVES[k] = BIG_FIVES[k].shiftRight(exponent).longValue();
            TOP_FIVES_EXPONENT[k] = exponent;
        }
    }

    private BinaryDecimalSign() {
    }

    /** Largest magnitude of {@code p} that {@link #of} accepts. */
    static int maxDecimalExponent() {
        return MAX_FIVE_POWER;
    }

    /**
     * The sign (-1, 0 or 1) of {@code a 2^b - n 10^p}.
     *
     * @throws IllegalArgumentException when {@code a} or {@code n} is negative, or {@code |p|} exceeds
     *                                  {@link #maxDecimalExponent()}
     */
    static int of(long a, int b, long n, int p) {
        if (a < 0 || n < 0 || Math.abs(p) > MAX_FIVE_POWER) {
            throw new IllegalArgumentException("a and n must be >= 0 and |p| <= " + MAX_FIVE_POWER + ", got a = "
                    + a + ", n = " + n + ", p = " + p);
        }
        int sign = Math.abs(p) <= LONG_FIVE_POWERS ? exact128(a, b, n, p)
                : p < 0 && a > 0 ? bounded128(a, b - p, n, -p) : UNDECIDED;
        return sign != UNDECIDED ? sign : big(a, b, n, p);
    }

    /** The sign when the power of five fits a {@code long}, or {@link #UNDECIDED} when a side reaches 2^127. */
    private static int exact128(long a, int b, long n, int p) {
        Wide left = p >= 0 ? Wide.of(a) : Wide.product(a, FIVES[-p]);
        Wide right = p >= 0 ? Wide.product(n, FIVES[p]) : Wide.of(n);
        int shift = b - p;
        Wide shifted = shift >= 0 ? left.shiftedLeft(shift) : right.shiftedLeft(-shift);
        if (shifted == null) {
            return UNDECIDED;
        }
        return shift >= 0 ? shifted.compareTo(right) : left.compareTo(shifted);
    }

    /**
     * The sign of {@code a 5^k 2^s - n} for {@code a > 0} and {@code k > 27} from the top 64 bits of 5^k, or
     * {@link #UNDECIDED}. Why it holds: {@code 5^k = (F + d) 2^g} with {@code 2^63 <= F < 2^64}, {@code g >= 0}
     * and {@code 0 < d < 1} (5^k is odd and longer than 64 bits, so never exactly {@code F 2^g}). If
     * {@code j = g + s >= 0} the left side is at least {@code a F >= 2^63 > n}. Otherwise, with {@code J = -j},
     * the sign is that of {@code a F + a d - n 2^J}, where {@code P = a F} is exact in 128 bits and
     * {@code a d} lies in (0, a): {@code P >= n 2^J} gives 1, {@code P + a <= n 2^J} gives -1, and anything
     * between is left undecided.
     */
    private static int bounded128(long a, int s, long n, int k) {
        int j = TOP_FIVES_EXPONENT[k] + s;
        if (j >= 0) {
            return 1;
        }
        Wide right = Wide.of(n).shiftedLeft(-j);
        if (right == null) {
            return UNDECIDED;
        }
        Wide product = Wide.unsignedProduct(a, TOP_FIVES[k]);
        if (product.compareTo(right) >= 0) {
            return 1;
        }
        return product.plus(a).compareTo(right) <= 0 ? -1 : UNDECIDED;
    }

    /** The same sign with {@link BigInteger}. */
    static int big(long a, int b, long n, int p) {
        BigInteger left = BigInteger.valueOf(a);
        BigInteger right = BigInteger.valueOf(n);
        if (p >= 0) {
            right = right.multiply(BIG_FIVES[p]);
        } else {
            left = left.multiply(BIG_FIVES[-p]);
        }
        int shift = b - p;
        if (shift >= 0) {
            left = left.shiftLeft(shift);
        } else {
            right = right.shiftLeft(-shift);
        }
        return left.compareTo(right);
    }

    private static long[] longFivePowers() {
        long[] powers = new long[LONG_FIVE_POWERS + 1];
        powers[0] = 1;
        for (int i = 1; i < powers.length; i++) {
            powers[i] = powers[i - 1] * 5;
        }
        return powers;
    }

    private static BigInteger[] bigFivePowers() {
        BigInteger[] powers = new BigInteger[MAX_FIVE_POWER + 1];
        powers[0] = BigInteger.ONE;
        for (int i = 1; i < powers.length; i++) {
            powers[i] = powers[i - 1].multiply(BigInteger.valueOf(5));
        }
        return powers;
    }

    /**
     * A non-negative integer below 2^127 as its high and low 64 bits.
     *
     * @param high the upper 64 bits, below 2^63
     * @param low  the lower 64 bits, unsigned
     */
    private record Wide(long high, long low) {

        static Wide of(long value) {
            return new Wide(0, value);
        }

        /** The exact product of two values in [0, 2^63). */
        static Wide product(long x, long y) {
            return new Wide(Math.multiplyHigh(x, y), x * y);
        }

        /** The exact product of {@code x} in [0, 2^63) and {@code y} read as unsigned. */
        static Wide unsignedProduct(long x, long y) {
            return new Wide(Math.multiplyHigh(x, y) + (y >> 63 & x), x * y);
        }

        /** This value plus {@code x} in [0, 2^63); below 2^127 while this value is below 2^127 - 2^63. */
        Wide plus(long x) {
            long sum = low + x;
            return new Wide(Long.compareUnsigned(sum, low) < 0 ? high + 1 : high, sum);
        }

        /** This value times 2^shift, or null when that reaches 2^127. */
        Wide shiftedLeft(int shift) {
            int leadingZeros = high != 0 ? Long.numberOfLeadingZeros(high) : 64 + Long.numberOfLeadingZeros(low);
            if (shift >= leadingZeros) {
                return null;
            }
            if (shift == 0) {
                return this;
            }
            if (shift >= 64) {
                return new Wide(low << (shift - 64), 0);
            }
            return new Wide(high << shift | low >>> (64 - shift), low << shift);
        }

        int compareTo(Wide other) {
            int byHigh = Long.compare(high, other.high);
            return byHigh != 0 ? byHigh : Long.compareUnsigned(low, other.low);
        }
    }
}
