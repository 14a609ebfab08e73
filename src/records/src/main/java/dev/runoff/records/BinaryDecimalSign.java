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
 * comparison runs on {@link BigInteger}.
 */
final class BinaryDecimalSign {

    /** Largest exponent k with 5^k below 2^63. */
    private static final int LONG_FIVE_POWERS = 27;
    private static final long[] FIVES = longFivePowers();
    private static final int MAX_FIVE_POWER = 400;
    private static final BigInteger[] BIG_FIVES = bigFivePowers();

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
        if (Math.abs(p) <= LONG_FIVE_POWERS) {
            Wide left = p >= 0 ? Wide.of(a) : Wide.product(a, FIVES[-p]);
            Wide right = p >= 0 ? Wide.product(n, FIVES[p]) : Wide.of(n);
            int shift = b - p;
            Wide shifted = shift >= 0 ? left.shiftedLeft(shift) : right.shiftedLeft(-shift);
            if (shifted != null) {
                return shift >= 0 ? shifted.compareTo(right) : left.compareTo(shifted);
            }
        }
        return big(a, b, n, p);
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
