package dev.runoff.engine.special;

import java.math.BigDecimal;
import java.math.BigInteger;
import java.math.MathContext;

/**
 * Exact-arithmetic reference for the incomplete beta function with integer shapes, through the binomial
 * identity {@code I_x(a, n - a + 1) = P(Binomial(n, x) >= a)} (Abramowitz and Stegun 1964, eq. 26.5.24).
 * The double {@code x} is converted exactly to decimal, the first binomial term is formed from an exact
 * integer coefficient, the next ones by the term ratio, all with 60 significant digits; the sum stops once
 * the terms have fallen below 1e-45 of it past the mode, so the result is correct far beyond double
 * precision.
 */
public final class ExactBinomial {
    private static final MathContext MC = new MathContext(60);
    private static final BigDecimal NEGLIGIBLE = new BigDecimal("1e-45");

    private ExactBinomial() {
    }

    /** {@code I_x(a, b) = P(Binomial(a + b - 1, x) >= a)} for integer {@code a, b >= 1}. */
    public static BigDecimal regularizedBeta(double x, int a, int b) {
        int n = a + b - 1;
        BigDecimal p = new BigDecimal(x);
        BigDecimal q = BigDecimal.ONE.subtract(p);
        BigDecimal ratio = p.divide(q, MC);
        BigDecimal term = firstTerm(n, a, p, q);
        BigDecimal sum = BigDecimal.ZERO;
        for (int j = a; j <= n; j++) {
            sum = sum.add(term, MC);
            if (j > n * x && term.compareTo(sum.multiply(NEGLIGIBLE, MC)) < 0) {
                break;
            }
            term = term.multiply(ratio, MC).multiply(BigDecimal.valueOf(n - j), MC)
                    .divide(BigDecimal.valueOf(j + 1L), MC);
        }
        return sum;
    }

    /** {@code 1 - I_x(a, b) = P(Binomial(n, x) <= a - 1)}, summed directly (no subtraction). */
    public static BigDecimal regularizedBetaComplement(double x, int a, int b) {
        int n = a + b - 1;
        BigDecimal p = new BigDecimal(x);
        BigDecimal q = BigDecimal.ONE.subtract(p);
        BigDecimal ratio = q.divide(p, MC);
        BigDecimal term = firstTerm(n, a - 1, p, q);
        BigDecimal sum = BigDecimal.ZERO;
        for (int j = a - 1; j >= 0; j--) {
            sum = sum.add(term, MC);
            if (j < n * x && term.compareTo(sum.multiply(NEGLIGIBLE, MC)) < 0) {
                break;
            }
            term = term.multiply(ratio, MC).multiply(BigDecimal.valueOf(j), MC)
                    .divide(BigDecimal.valueOf(n - j + 1L), MC);
        }
        return sum;
    }

    /** Natural log of a positive decimal, to double precision (also far outside the double range). */
    public static double log(BigDecimal v) {
        int shift = v.precision() - v.scale() - 1;
        BigDecimal mantissa = v.movePointLeft(shift);
        return Math.log(mantissa.doubleValue()) + shift * Math.log(10);
    }

    /** {@code C(n, j) p^j q^(n-j)}. */
    private static BigDecimal firstTerm(int n, int j, BigDecimal p, BigDecimal q) {
        BigInteger choose = BigInteger.ONE;
        for (int i = 0; i < j; i++) {
            choose = choose.multiply(BigInteger.valueOf(n - i)).divide(BigInteger.valueOf(i + 1L));
        }
        return new BigDecimal(choose).multiply(p.pow(j, MC), MC).multiply(q.pow(n - j, MC), MC);
    }
}
