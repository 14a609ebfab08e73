package dev.runoff.records;

import java.math.BigInteger;

/**
 * The text of a finite double as ECMAScript {@code Number::toString} writes it (ECMA-262 section 6.1.6.1.20,
 * adopted by RFC 8785 section 3.2.2.3): the decimal with the fewest significant digits that reads back as the
 * double, the closest to it among those of that length, the even one on a tie (step 5), laid out in plain
 * notation for magnitudes in [1e-6, 1e21) and as {@code d.ddde+x} / {@code d.ddde-x} otherwise (steps 6 to
 * 10); {@code -0} as {@code 0}.
 *
 * <p>Digits by Schubfach (R. Giulietti, "The Schubfach way to render doubles", 2020). A positive double is
 * {@code v = c 2^q}; the reals that round to it form the interval R of width {@code 2^q} (or {@code 3/4 2^q}
 * when c is the smallest normal significand, the gap below being half the gap above), closed when c is even
 * (IEEE 754 round-half-even). With {@code k = floor(log10(width))}, R holds at least one multiple of 10^k
 * and at most one multiple of 10^(k+1). {@code s = floor(v 10^-k)} and the comparisons of the bounds
 * against multiples of 10^k come from products with a 126-bit approximation of 10^-k rounded to odd, which
 * the paper proves decide every comparison exactly. If a multiple of 10^(k+1) lies in R it is the shortest
 * decimal there (the paper; for ECMAScript's rule see below); otherwise the shortest are the multiples of
 * 10^k, of which s 10^k and (s + 1) 10^k are the candidates, and the closer to v is chosen.
 *
 * <p>Where ECMAScript differs from Java 19's {@code Double.toString}, which also uses Schubfach: Java keeps
 * at least two digits (it looks for a multiple of 10^(k+1) only when {@code s >= 100}, and scales the
 * smallest subnormals by ten), ECMAScript keeps the shortest. Here the multiple of 10^(k+1) is looked for
 * whenever {@code s >= 10}: then {@code v >= 10^(k+1)}, so any decimal in R with as few digits as that multiple
 * lies farther from v. When {@code s < 10} the candidates s and s + 1 are single digits (or 10, one digit too)
 * and the closer wins, which is what step 5 asks. {@code CanonicalNumberTest} checks the result against the
 * earlier implementation (Java 17's digits proven shortest by exact arithmetic, or an exact search) on
 * millions of doubles and against Node.js.
 */
final class CanonicalNumber {

    /** Longest text: a sign, 17 digits, {@code 0.} and five zeros. */
    static final int MAX_LENGTH = 25;

    private static final int SIGNIFICAND_BITS = 52;
    private static final long C_MIN = 1L << SIGNIFICAND_BITS;
    private static final int Q_MIN = -1074;
    private static final int Q_MAX = 971;
    private static final int EXPONENT_BIAS = 1075;
    private static final int K_MIN = flog10pow2(Q_MIN);
    private static final int K_MAX = flog10pow2(Q_MAX);
    /** Doubles with an integer value below this are written as that integer (see {@link #write}). */
    private static final double EXACT_INTEGERS = 0x1p53;
    private static final int PLAIN_UPPER_EXPONENT = 21;
    private static final int PLAIN_LOWER_EXPONENT = -6;
    private static final long MASK_63 = Long.MAX_VALUE;
    /** 10^0 to 10^18. */
    private static final long[] POWERS_OF_TEN = powersOfTen();
    /** The upper and lower 63 bits of g(k) for k from K_MIN to K_MAX (see {@link #approximations}). */
    private static final long[] G1 = new long[K_MAX - K_MIN + 1];
    private static final long[] G0 = new long[K_MAX - K_MIN + 1];

    static {
        approximations();
    }

    private CanonicalNumber() {
    }

    /**
     * Writes the text of {@code value} into {@code out} from index 0 and returns its length (at most
     * {@link #MAX_LENGTH}).
     *
     * <p>Why an integer value below 2^53 is written as its digits: the reals that round to it lie within half
     * a unit of it (its neighbours are at most 1 away), while a decimal with fewer significant digits than the
     * integer's, once its trailing zeros are dropped, is a multiple of a power of ten that the integer is not,
     * so at least 1 away; and of the decimals with as many digits the integer itself is the closest. Written
     * in plain notation, since it is below 1e21.
     *
     * @throws IllegalArgumentException for NaN and infinities
     */
    static int write(double value, char[] out) {
        if (!Double.isFinite(value)) {
            throw new IllegalArgumentException("number: " + value + " cannot be written in JSON");
        }
        if (value == 0) {
            out[0] = '0';
            return 1;
        }
        int start = 0;
        double magnitude = value;
        if (value < 0) {
            out[start++] = '-';
            magnitude = -value;
        }
        if (magnitude < EXACT_INTEGERS && magnitude == Math.rint(magnitude)) {
            return digits((long) magnitude, out, start, length((long) magnitude));
        }
        return shortest(magnitude, out, start);
    }

    /** The Schubfach search for a positive finite {@code v}, laid out from {@code start}. */
    private static int shortest(double v, char[] out, int start) {
        long bits = Double.doubleToRawLongBits(v);
        int biased = (int) (bits >>> SIGNIFICAND_BITS);
        long fraction = bits & (C_MIN - 1);
        long c = biased == 0 ? fraction : fraction | C_MIN;
        int q = biased == 0 ? Q_MIN : biased - EXPONENT_BIAS;
        boolean symmetric = c != C_MIN || q == Q_MIN;
        int k = symmetric ? flog10pow2(q) : flog10ThreeQuartersPow2(q);
        long cb = c << 2;
        long cbl = symmetric ? cb - 2 : cb - 1;
        long cbr = cb + 2;
        int h = q + flog2pow10(-k) + 2;
        long g1 = G1[k - K_MIN];
        long g0 = G0[k - K_MIN];
        long vb = roundToOdd(g1, g0, cb << h);
        long vbl = roundToOdd(g1, g0, cbl << h);
        long vbr = roundToOdd(g1, g0, cbr << h);
        int excluded = (int) c & 1;
        long s = vb >> 2;
        if (s >= 10) {
            long sp10 = 10 * (s / 10);
            long tp10 = sp10 + 10;
            boolean upIn = vbl + excluded <= sp10 << 2;
            boolean wpIn = (tp10 << 2) + excluded <= vbr;
            if (upIn != wpIn) {
                return layout(upIn ? sp10 : tp10, k, out, start);
            }
        }
        long t = s + 1;
        boolean uIn = vbl + excluded <= s << 2;
        boolean wIn = (t << 2) + excluded <= vbr;
        if (uIn != wIn) {
            return layout(uIn ? s : t, k, out, start);
        }
        long cmp = vb - (s + t << 1);
        return layout(cmp < 0 || cmp == 0 && (s & 1) == 0 ? s : t, k, out, start);
    }

    /**
     * {@code g cp 2^-127} rounded to odd, g being {@code g1 2^63 + g0}: its floor, with the lowest bit set when
     * the product is not an integer (the paper's {@code rop}).
     */
    private static long roundToOdd(long g1, long g0, long cp) {
        long x1 = Math.multiplyHigh(g0, cp);
        long y0 = g1 * cp;
        long y1 = Math.multiplyHigh(g1, cp);
        long z = (y0 >>> 1) + x1;
        long floor = y1 + (z >>> 63);
        return floor | (z & MASK_63) + MASK_63 >>> 63;
    }

    /**
     * Lays out {@code f 10^e} ({@code f > 0}) from {@code start} following ECMAScript Number::toString steps 6
     * to 10, with s the digits of f without trailing zeros (k of them) and n the decimal exponent such that
     * the value is {@code 0.s 10^n}.
     */
    private static int layout(long f, int e, char[] out, int start) {
        long s = f;
        int exponent = e;
        while (s % 10 == 0) {
            s /= 10;
            exponent++;
        }
        int k = length(s);
        int n = k + exponent;
        if (k <= n && n <= PLAIN_UPPER_EXPONENT) {
            int end = digits(s, out, start, k);
            return zeros(out, end, n - k);
        }
        if (0 < n && n <= PLAIN_UPPER_EXPONENT) {
            digits(s, out, start + 1, k);
            System.arraycopy(out, start + 1, out, start, n);
            out[start + n] = '.';
            return start + k + 1;
        }
        if (PLAIN_LOWER_EXPONENT < n && n <= 0) {
            out[start] = '0';
            out[start + 1] = '.';
            int end = zeros(out, start + 2, -n);
            return digits(s, out, end, k);
        }
        int end;
        if (k == 1) {
            out[start] = (char) ('0' + s);
            end = start + 1;
        } else {
            end = digits(s, out, start + 1, k);
            out[start] = out[start + 1];
            out[start + 1] = '.';
        }
        out[end] = 'e';
        out[end + 1] = n - 1 < 0 ? '-' : '+';
        int magnitude = Math.abs(n - 1);
        return digits(magnitude, out, end + 2, length(magnitude));
    }

    /** Writes the {@code count} decimal digits of {@code x} from {@code start}, two at a time; returns the end. */
    private static int digits(long x, char[] out, int start, int count) {
        long rest = x;
        int i = start + count;
        while (i - start >= 2) {
            int pair = (int) (rest % 100);
            rest /= 100;
            out[--i] = (char) ('0' + pair % 10);
            out[--i] = (char) ('0' + pair / 10);
        }
        if (i > start) {
            out[--i] = (char) ('0' + rest);
        }
        return start + count;
    }

    private static int zeros(char[] out, int start, int count) {
        for (int i = 0; i < count; i++) {
            out[start + i] = '0';
        }
        return start + count;
    }

    /** Number of decimal digits of {@code x >= 1}. */
    private static int length(long x) {
        int n = 1;
        while (n < POWERS_OF_TEN.length && x >= POWERS_OF_TEN[n]) {
            n++;
        }
        return n;
    }

    /** floor(e log10(2)) for |e| up to a few thousand (checked exactly over the range used by the tests). */
    static int flog10pow2(int e) {
        return (int) (e * 661_971_961_083L >> 41);
    }

    /** floor(log10(3/4 2^e)), as {@link #flog10pow2}. */
    static int flog10ThreeQuartersPow2(int e) {
        return (int) (e * 661_971_961_083L - 274_743_187_321L >> 41);
    }

    /** floor(e log2(10)), as {@link #flog10pow2}. */
    static int flog2pow10(int e) {
        return (int) (e * 913_124_641_741L >> 38);
    }

    /**
     * Fills G1 and G0: for each k, with 10^-k = beta 2^r and 2^125 <= beta < 2^126, g(k) = floor(beta) + 1,
     * a 126-bit integer (the paper's choice, which makes every comparison of {@link #shortest} exact).
     */
    private static void approximations() {
        for (int k = K_MIN; k <= K_MAX; k++) {
            int shift = 125 - flog2pow10(-k);
            BigInteger g = k <= 0
                    ? shifted(BigInteger.TEN.pow(-k), shift)
                    : BigInteger.ONE.shiftLeft(shift).divide(BigInteger.TEN.pow(k));
            g = g.add(BigInteger.ONE);
            G1[k - K_MIN] = g.shiftRight(63).longValueExact();
            G0[k - K_MIN] = g.longValue() & MASK_63;
        }
    }

    private static long[] powersOfTen() {
        long[] powers = new long[19];
        powers[0] = 1;
        for (int i = 1; i < powers.length; i++) {
            powers[i] = 10 * powers[i - 1];
        }
        return powers;
    }

    /** floor(x 2^shift). */
    private static BigInteger shifted(BigInteger x, int shift) {
        return shift >= 0 ? x.shiftLeft(shift) : x.shiftRight(-shift);
    }
}
