package dev.runoff.engine.special;

import dev.runoff.engine.core.Checks;
import org.apache.commons.math3.special.Beta;

/**
 * The regularized incomplete beta function {@code I_x(a, b)} and its complement, in log space, for fixed
 * shape parameters (constants such as {@code log B(a, b)} are computed once per instance). Instances are
 * immutable and thread-safe.
 *
 * <p>Design:
 * <ul>
 *   <li>{@code I_x(a, b) = x^a (1 - x)^b / (a B(a, b)) * CF} with the continued fraction of Press et al.
 *       (2007), "Numerical Recipes", 3rd ed., section 6.4 (eq. 6.4.5), evaluated by the forward recurrence
 *       for its convergents (Wallis' recurrence, with renormalisation against overflow, ibid. section 5.2).
 *       That needs no division per term, unlike the modified Lentz method, and measured 1.6 times faster
 *       here with the same accuracy (both within 3e-14 of exact binomial sums in a random check).
 *       It converges quickly for {@code x < (a + 1) / (a + b + 2)}; above that point the symmetry
 *       {@code I_x(a, b) = 1 - I_{1-x}(b, a)} is used and the complement taken in log space, so whichever
 *       tail is small is always computed directly and never by subtraction.</li>
 *   <li>The kernel {@code log(x^a (1 - x)^b / B(a, b))} cancels badly when {@code a} and {@code b} are both
 *       large (two terms of size {@code a + b} summing to order 1). For {@code min(a, b) >= 8} it is taken
 *       in the form of DiDonato and Morris (1992), "Algorithm 708: significant digit computation of the
 *       incomplete beta function ratios" (routine BRCOMP): {@code -(a u + b v) + log sqrt(a b / (2 pi
 *       (a + b))) - bcorr(a, b)}, with {@code u, v} of the form {@code e - log(1 + e)} and {@code bcorr}
 *       the Stirling correction, so the result keeps its absolute accuracy whatever the size of a and b.</li>
 * </ul>
 */
public final class IncompleteBeta {
    private static final double HALF_LOG_TWO_PI = 0.9189385332046728;
    private static final double EPSILON = 1e-16;
    private static final double RESCALE = 1e150;
    private static final int BASE_ITERATIONS = 1000;
    private static final double LARGE_SHAPE = 8.0;

    private final double a;
    private final double b;
    private final double logBeta;
    private final double logOfA;
    private final double logOfB;
    private final boolean large;
    private final double largeConstant;
    private final int maxIterations;

    /**
     * Precomputes the constants for shapes {@code a} and {@code b}.
     *
     * @param a first shape, finite and {@code > 0}
     * @param b second shape, finite and {@code > 0}
     */
    public IncompleteBeta(double a, double b) {
        this.a = Checks.positive("incomplete beta a", a);
        this.b = Checks.positive("incomplete beta b", b);
        this.logBeta = Beta.logBeta(a, b);
        this.logOfA = StrictMath.log(a);
        this.logOfB = StrictMath.log(b);
        this.large = Math.min(a, b) >= LARGE_SHAPE;
        double x0 = a / (a + b);
        this.largeConstant = large
                ? 0.5 * StrictMath.log(b * x0) - HALF_LOG_TWO_PI - Stirling.betaCorrection(a, b) : 0.0;
        this.maxIterations = BASE_ITERATIONS + (int) (20 * StrictMath.sqrt(Math.max(a, b)));
    }

    /** {@code log I_x(a, b)} for {@code 0 <= x <= 1}. */
    public static double logRegularized(double x, double a, double b) {
        Checks.inClosedRange("x", x, 0, 1);
        return new IncompleteBeta(a, b).logLower(x, 1 - x);
    }

    /** {@code log(1 - I_x(a, b))} for {@code 0 <= x <= 1}. */
    public static double logRegularizedComplement(double x, double a, double b) {
        Checks.inClosedRange("x", x, 0, 1);
        return new IncompleteBeta(a, b).logUpper(x, 1 - x);
    }

    /** The first shape parameter. */
    public double a() {
        return a;
    }

    /** The second shape parameter. */
    public double b() {
        return b;
    }

    /** {@code log B(a, b)}. */
    public double logBeta() {
        return logBeta;
    }

    /**
     * {@code log I_x(a, b)}, the log of the lower tail.
     *
     * @param x the point, in {@code [0, 1]}
     * @param y {@code 1 - x}, supplied by the caller so that it can be exact (for instance when the caller
     *          knows {@code y} better than {@code 1 - x} would give it)
     * @return {@code log I_x(a, b)}, in {@code [-infinity, 0]}
     */
    public double logLower(double x, double y) {
        if (!(x > 0)) {
            return Double.NEGATIVE_INFINITY;
        }
        if (!(y > 0)) {
            return 0.0;
        }
        return logLower(x, y, logKernel(x, y));
    }

    /**
     * {@code log I_x(a, b)} for {@code 0 < x < 1}, {@code y = 1 - x}, given the kernel {@link #logKernel} at
     * {@code (x, y)} (for a caller that has it already).
     */
    double logLower(double x, double y, double kernel) {
        return logTail(x, y, a, b, logOfA, logOfB, kernel);
    }

    /**
     * {@code log(1 - I_x(a, b)) = log I_y(b, a)}, the log of the upper tail.
     *
     * @param x the point, in {@code [0, 1]}
     * @param y {@code 1 - x}
     * @return the log of the upper tail, in {@code [-infinity, 0]}
     */
    public double logUpper(double x, double y) {
        if (!(y > 0)) {
            return Double.NEGATIVE_INFINITY;
        }
        if (!(x > 0)) {
            return 0.0;
        }
        return logUpper(x, y, logKernel(x, y));
    }

    /** {@code log(1 - I_x(a, b))}, otherwise as {@link #logLower(double, double, double)}. */
    double logUpper(double x, double y, double kernel) {
        return logTail(y, x, b, a, logOfB, logOfA, kernel);
    }

    /**
     * {@code log I_u(p, q)} with {@code v = 1 - u} and {@code kernel = log(u^p v^q / B(p, q))} (the kernel is
     * the same for both tails): the continued fraction where it converges fast, else the complement of the
     * other tail.
     */
    private double logTail(double u, double v, double p, double q, double logP, double logQ, double kernel) {
        if (u * (p + q + 2) < p + 1) {
            return kernel - logP + StrictMath.log(continuedFraction(u, p, q));
        }
        return LogMath.log1mExp(kernel - logQ + StrictMath.log(continuedFraction(v, q, p)));
    }

    /**
     * {@code log(x^a y^b / B(a, b))} with {@code y = 1 - x}; the log density of Beta(a, b) at {@code x} is
     * this minus {@code log x + log y}.
     */
    public double logKernel(double x, double y) {
        if (!large) {
            return a * logOf(x, y) + b * logOf(y, x) - logBeta;
        }
        double lambda;
        double x0;
        double y0;
        if (a > b) {
            double h = b / a;
            x0 = 1 / (1 + h);
            y0 = h / (1 + h);
            lambda = (a + b) * y - b;
        } else {
            double h = a / b;
            x0 = h / (1 + h);
            y0 = 1 / (1 + h);
            lambda = a - (a + b) * x;
        }
        double u = deviance(-lambda / a, x / x0);
        double v = deviance(lambda / b, y / y0);
        return -(a * u + b * v) + largeConstant;
    }

    /**
     * {@code log Beta(a, b) density} at {@code x}, with {@code y = 1 - x}; {@code x} and {@code y} must lie in
     * {@code (0, 1)}.
     */
    public double logDensity(double x, double y) {
        double logX = logOf(x, y);
        double logY = logOf(y, x);
        if (!large) {
            return (a - 1) * logX + (b - 1) * logY - logBeta;
        }
        return logKernel(x, y) - logX - logY;
    }

    /**
     * {@code log v} where {@code v + w = 1}: the smaller of the two is taken as the accurate one, so the log
     * of the larger is {@code log1p(-smaller)} (a rounded {@code 1 - x} would cost {@code b * 1e-16}).
     */
    static double logOf(double v, double w) {
        return v <= w ? StrictMath.log(v) : StrictMath.log1p(-w);
    }

    /** {@code e - log(1 + e)} where {@code ratio = 1 + e}, choosing the accurate form. */
    private static double deviance(double e, double ratio) {
        if (Math.abs(e) > 0.6) {
            return e - StrictMath.log(ratio);
        }
        return Stirling.rlog1(e);
    }

    /**
     * The continued fraction by its forward recurrence. The term index is carried as a double ({@code m} and
     * {@code 2m} are small integers, exact in either type, so every term has the same bits as with an
     * {@code int} index): with an {@code int} index converted to a double several times per term, the loop
     * ran up to 3.5 times slower on the build machine, depending on how the JIT compiled it (measured side
     * by side on 200,000 random points near the centre of five-arm posteriors, and in src/docs/performance.md;
     * the likely cause, not checked, is that each conversion writes only part of its register and so waits
     * for that register's previous value).
     */
    private double continuedFraction(double x, double p, double q) {
        double sum = p + q;
        double pPlus = p + 1;
        double pMinus = p - 1;
        double numeratorPrev = 1;
        double denominatorPrev = 1;
        double numerator = 1;
        double denominator = 1 - sum * x / pPlus;
        double h = numerator / denominator;
        double m = 0;
        for (int step = 1; step <= maxIterations; step++) {
            m += 1;
            double m2 = m + m;
            double pTwoM = p + m2;
            double even = m * (q - m) * x / ((pMinus + m2) * pTwoM);
            double odd = -(p + m) * (sum + m) * x / (pTwoM * (pPlus + m2));
            double numeratorEven = numerator + even * numeratorPrev;
            double denominatorEven = denominator + even * denominatorPrev;
            numeratorPrev = numeratorEven;
            denominatorPrev = denominatorEven;
            numerator = numeratorEven + odd * numerator;
            denominator = denominatorEven + odd * denominator;
            double size = Math.abs(denominator);
            if (size > RESCALE || size < 1 / RESCALE) {
                double r = 1 / size;
                numeratorPrev *= r;
                denominatorPrev *= r;
                numerator *= r;
                denominator *= r;
            }
            double next = numerator / denominator;
            if (Math.abs(next - h) <= EPSILON * Math.abs(next)) {
                return next;
            }
            h = next;
        }
        throw new ArithmeticException("incomplete beta continued fraction did not converge in "
                + maxIterations + " steps for x=" + x + ", a=" + p + ", b=" + q);
    }
}
