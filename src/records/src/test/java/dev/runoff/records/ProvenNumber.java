package dev.runoff.records;

import java.math.BigDecimal;
import java.math.MathContext;
import java.math.RoundingMode;

/**
 * The canonical number text as {@link CanonicalJson} computed it before {@link CanonicalNumber}: the digits of
 * Java 17's {@link Double#toString(double)}, used only when exact comparisons ({@link BinaryDecimalSign})
 * prove them to be the ones ECMAScript Number::toString step 5 chooses, else an exact search over
 * {@link BigDecimal}. Kept as the reference that {@code CanonicalNumberTest} compares the new digits with.
 */
final class ProvenNumber {

    private static final int PLAIN_UPPER_EXPONENT = 21;
    private static final int PLAIN_LOWER_EXPONENT = -6;
    private static final double EXACT_INTEGERS = 0x1p53;

    private ProvenNumber() {
    }

    /** The canonical text of a finite {@code value}, as {@link CanonicalJson#number(double)} wrote it. */
    static String number(double value) {
        if (value == 0) {
            return "0";
        }
        if (value < 0) {
            return "-" + number(-value);
        }
        if (value < EXACT_INTEGERS && value == Math.rint(value)) {
            return Long.toString((long) value);
        }
        String fast = JavaDigits.canonical(value);
        return fast != null ? fast : exactNumber(value);
    }

    /** The canonical text of a positive finite {@code value} by the exact search of {@link #shortestDecimal}. */
    static String exactNumber(double value) {
        BigDecimal shortest = shortestDecimal(value).stripTrailingZeros();
        String digits = shortest.unscaledValue().toString();
        return layout(digits, digits.length() - shortest.scale());
    }

    /**
     * The canonical text of a positive finite {@code value} from the digits of {@link Double#toString(double)}
     * when exact comparisons prove them to be the ones {@link #shortestDecimal} would choose, else null.
     *
     * <p>Why the proof holds: let D be Java's digits without trailing zeros, L of them, with step u between
     * L-digit decimals at D's exponent. If D reads back and the exact value lies strictly within u/2 of D,
     * D is the unique nearest L-digit decimal, so the nearest of those that read back. The exact value then
     * also lies strictly between T (D cut to L - 1 digits) and T + 10u, the two (L - 1)-digit decimals around
     * it; any other (L - 1)-digit decimal lies farther away, outside the interval that reads back if those two
     * lie outside it. So when neither reads back, no decimal of fewer than L digits does (whether p digits
     * suffice is monotone in p), and D is the answer. Otherwise the exact search decides.
     */
    static String fastNumber(double value) {
        return JavaDigits.canonical(value);
    }

    /**
     * The digits of {@link Double#toString(double)} and the exact comparisons that prove them canonical. A
     * positive finite double is {@code m 2^e} with integer m; decimals are {@code N 10^p} with integer N; the
     * bounds of the interval that reads back are {@code (2m - 1) 2^(e-1)} (or {@code (4m - 1) 2^(e-2)} when the
     * value is a power of two, where the gap below is half the gap above) and {@code (2m + 1) 2^(e-1)}, included
     * when m is even (IEEE 754 round-half-even), as in {@link RoundingInterval}.
     */
    private static final class JavaDigits {
        private static final long MAX_DIGITS = 100_000_000_000_000_000L;
        private static final int MAX_EXPONENT = BinaryDecimalSign.maxDecimalExponent() - 2;

        private final long m;
        private final int e;
        private final long lowM;
        private final int lowE;

        private JavaDigits(double value) {
            long bits = Double.doubleToRawLongBits(value);
            int biased = (int) (bits >>> 52);
            long fraction = bits & ((1L << 52) - 1);
            m = biased == 0 ? fraction : fraction | (1L << 52);
            e = biased == 0 ? -1074 : biased - 1075;
            boolean narrowBelow = fraction == 0 && biased > 1;
            lowM = narrowBelow ? 4 * m - 1 : 2 * m - 1;
            lowE = narrowBelow ? e - 2 : e - 1;
        }

        static String canonical(double value) {
            String text = Double.toString(value);
            long digits = 0;
            int exponent = 0;
            boolean fraction = false;
            for (int i = 0; i < text.length(); i++) {
                char c = text.charAt(i);
                if (c == '.') {
                    fraction = true;
                } else if (c == 'E') {
                    exponent += Integer.parseInt(text, i + 1, text.length(), 10);
                    break;
                } else {
                    digits = digits * 10 + (c - '0');
                    if (digits >= MAX_DIGITS) {
                        return null;
                    }
                    exponent -= fraction ? 1 : 0;
                }
            }
            while (digits % 10 == 0) {
                digits /= 10;
                exponent++;
            }
            if (exponent < -MAX_EXPONENT || exponent > MAX_EXPONENT) {
                return null;
            }
            return new JavaDigits(value).isCanonical(digits, exponent)
                    ? layout(Long.toString(digits), length(digits) + exponent) : null;
        }

        private boolean isCanonical(long digits, int exponent) {
            boolean nearest = BinaryDecimalSign.of(m, e, 10 * digits - 5, exponent - 1) > 0
                    && BinaryDecimalSign.of(m, e, 10 * digits + 5, exponent - 1) < 0;
            return nearest && readsBack(digits, exponent) && (digits < 10
                    || !readsBack(digits / 10, exponent + 1) && !readsBack(digits / 10 + 1, exponent + 1));
        }

        private boolean readsBack(long digits, int exponent) {
            int vsLow = -BinaryDecimalSign.of(lowM, lowE, digits, exponent);
            int vsHigh = -BinaryDecimalSign.of(2 * m + 1, e - 1, digits, exponent);
            return vsLow > 0 && vsHigh < 0 || (m & 1) == 0 && (vsLow == 0 || vsHigh == 0);
        }

        private static int length(long digits) {
            int n = 1;
            for (long d = digits; d >= 10; d /= 10) {
                n++;
            }
            return n;
        }
    }

    /**
     * Lays out digits {@code s} (k of them) with decimal exponent {@code n}, meaning s * 10^(n - k), following
     * ECMAScript Number::toString steps 6 to 10.
     */
    private static String layout(String s, int n) {
        int k = s.length();
        if (k <= n && n <= PLAIN_UPPER_EXPONENT) {
            return s + "0".repeat(n - k);
        }
        if (0 < n && n <= PLAIN_UPPER_EXPONENT) {
            return s.substring(0, n) + "." + s.substring(n);
        }
        if (PLAIN_LOWER_EXPONENT < n && n <= 0) {
            return "0." + "0".repeat(-n) + s;
        }
        int e = n - 1;
        String exponent = "e" + (e < 0 ? "-" : "+") + Math.abs(e);
        return k == 1 ? s + exponent : s.charAt(0) + "." + s.substring(1) + exponent;
    }

    /**
     * The decimal with the fewest significant digits that rounds back to {@code value} (positive, finite),
     * the closer one when two such decimals of that length exist, the even one on an exact tie: the choice
     * ECMAScript Number::toString step 5 prescribes. Whether p digits suffice is monotone in p (every p-digit
     * decimal is also a (p + 1)-digit one). {@link Double#toString(double)} gives a decimal that reads back
     * exactly, usually (but on Java 17 not always) of the fewest digits: its length is tried first and one
     * digit fewer; a binary search below it runs only when that shorter length suffices.
     */
    static BigDecimal shortestDecimal(double value) {
        RoundingInterval interval = new RoundingInterval(value);
        int hi = new BigDecimal(Double.toString(value)).stripTrailingZeros().precision();
        BigDecimal best = interval.nearestReadingBack(hi);
        if (hi == 1 || interval.nearestReadingBack(hi - 1) == null) {
            return best;
        }
        int lo = 1;
        hi--;
        best = interval.nearestReadingBack(hi);
        while (lo < hi) {
            int mid = (lo + hi) >>> 1;
            BigDecimal candidate = interval.nearestReadingBack(mid);
            if (candidate != null) {
                best = candidate;
                hi = mid;
            } else {
                lo = mid + 1;
            }
        }
        return best;
    }

    /**
     * The exact value of a positive finite double and the bounds of the reals that round to it under IEEE 754
     * round-half-even: half the gap to each neighbour (the gap above is {@link Math#ulp(double)}, also for
     * the largest double, whose upper bound is where rounding overflows to infinity).
     */
    private static final class RoundingInterval {
        private static final BigDecimal HALF = new BigDecimal("0.5");

        private final BigDecimal exact;
        private final BigDecimal low;
        private final BigDecimal high;
        private final boolean boundsReadBack;

        RoundingInterval(double value) {
            exact = new BigDecimal(value);
            low = exact.subtract(new BigDecimal(value - Math.nextDown(value)).multiply(HALF));
            high = exact.add(new BigDecimal(Math.ulp(value)).multiply(HALF));
            boundsReadBack = (Double.doubleToRawLongBits(value) & 1) == 0;
        }

        /** The p-digit decimal nearest to the value among those that read back as it, or null if none does. */
        BigDecimal nearestReadingBack(int p) {
            BigDecimal down = exact.round(new MathContext(p, RoundingMode.FLOOR));
            BigDecimal up = exact.round(new MathContext(p, RoundingMode.CEILING));
            boolean downOk = readsBack(down);
            boolean upOk = readsBack(up);
            if (downOk && upOk) {
                int cmp = exact.subtract(down).compareTo(up.subtract(exact));
                if (cmp != 0) {
                    return cmp < 0 ? down : up;
                }
                return exact.round(new MathContext(p, RoundingMode.HALF_EVEN));
            }
            return downOk ? down : upOk ? up : null;
        }

        private boolean readsBack(BigDecimal decimal) {
            int vsLow = decimal.compareTo(low);
            int vsHigh = decimal.compareTo(high);
            return vsLow > 0 && vsHigh < 0 || boundsReadBack && (vsLow == 0 || vsHigh == 0);
        }
    }
}
