package dev.runoff.engine.special;

import java.math.BigDecimal;
import java.math.BigInteger;
import java.math.MathContext;

/**
 * Exact-arithmetic reference for the incomplete beta function with integer shapes, through the binomial
 * identity {@code I_x(a, n - a + 1) = P(Binomial(n, x) >= a)} (Abramowitz and Stegun 1964, eq. 26.5.24).
 * The double {@code x} is converted exactly to decimal, the binomial coefficients are exact integers, and
 * the sum is carried with 60 significant digits, so the result is correct to far beyond double precision.
 */
public final class ExactBinomial {
    private static final MathContext MC = new MathContext(60);

    private ExactBinomial() {
    }

    /** {@code I_x(a, b)} for integer {@code a, b >= 1}, as a 60-digit decimal. */
    public static BigDecimal regularizedBeta(double x, int a, int b) {
        int n = a + b - 1;
        BigDecimal p = new BigDecimal(x);
        BigDecimal q = BigDecimal.ONE.subtract(p);
        BigDecimal sum = BigDecimal.ZERO;
        BigInteger choose = binomial(n, a);
        for (int j = a; j <= n; j++) {
            BigDecimal term = new BigDecimal(choose).multiply(p.pow(j, MC), MC).multiply(q.pow(n - j, MC), MC);
            sum = sum.add(term, MC);
            choose = choose.multiply(BigInteger.valueOf(n - j)).divide(BigInteger.valueOf(j + 1));
        }
        return sum;
    }

    /** {@code 1 - I_x(a, b) = P(Binomial(n, x) <= a - 1)}, summed directly (no subtraction). */
    public static BigDecimal regularizedBetaComplement(double x, int a, int b) {
        int n = a + b - 1;
        BigDecimal p = new BigDecimal(x);
        BigDecimal q = BigDecimal.ONE.subtract(p);
        BigDecimal sum = BigDecimal.ZERO;
        BigInteger choose = BigInteger.ONE;
        for (int j = 0; j <= a - 1; j++) {
            BigDecimal term = new BigDecimal(choose).multiply(p.pow(j, MC), MC).multiply(q.pow(n - j, MC), MC);
            sum = sum.add(term, MC);
            choose = choose.multiply(BigInteger.valueOf(n - j)).divide(BigInteger.valueOf(j + 1));
        }
        return sum;
    }

    /** Natural log of a positive decimal, to double precision (exact for values far outside double range). */
    public static double log(BigDecimal v) {
        int shift = v.precision() - v.scale() - 1;
        BigDecimal mantissa = v.movePointLeft(shift);
        return Math.log(mantissa.doubleValue()) + shift * Math.log(10);
    }

    private static BigInteger binomial(int n, int k) {
        BigInteger r = BigInteger.ONE;
        for (int i = 0; i < k; i++) {
            r = r.multiply(BigInteger.valueOf(n - i)).divide(BigInteger.valueOf(i + 1));
        }
        return r;
    }
}
