package dev.runoff.engine.special;

import java.util.function.DoubleUnaryOperator;

/**
 * Solves {@code log F(x) = target} or {@code log S(x) = target} for a continuous distribution given its log
 * tail and log density, accurately far into the tails (targets down to the smallest log-probabilities).
 *
 * <p>Design: safeguarded Newton iteration ("rtsafe", Press et al. 2007, "Numerical Recipes", 3rd ed.,
 * section 9.4): a bracket is kept and a bisection step replaces any Newton step that leaves it or does not
 * halve the error. The unknown is mapped to an unbounded variable {@code u} (logistic map onto a finite
 * support, {@code sinh} for the real line, {@code exp} for a half-line) so that the bracket is finite, a
 * bisection step costs at most a factor 2 in {@code u}, and tails far from the centre are reached in few
 * steps. On the log scale the equation is nearly linear in {@code u} in the tails, so Newton converges fast.
 */
public final class TailRoot {
    private static final double LOGISTIC_LIMIT = 745;
    private static final double SINH_LIMIT = 710;
    private static final int MAX_STEPS = 400;

    private final DoubleUnaryOperator logTail;
    private final DoubleUnaryOperator logDensity;
    private final boolean upper;
    private final double lower;
    private final double upperBound;
    private final double center;
    private final double spread;

    private TailRoot(DoubleUnaryOperator logTail, DoubleUnaryOperator logDensity, boolean upper,
                     double lower, double upperBound, double center, double spread) {
        this.logTail = logTail;
        this.logDensity = logDensity;
        this.upper = upper;
        this.lower = lower;
        this.upperBound = upperBound;
        this.center = center;
        this.spread = spread;
    }

    /**
     * A solver of {@code logCdf(x) = target}.
     *
     * @param logCdf     log of the distribution function, non-decreasing
     * @param logDensity log density
     * @param lower      lower end of the support ({@code -infinity} allowed)
     * @param upper      upper end of the support ({@code +infinity} allowed)
     * @param center     a central point of the distribution inside the support
     * @param spread     a positive scale of the distribution (used to map infinite supports)
     */
    public static TailRoot ofCdf(DoubleUnaryOperator logCdf, DoubleUnaryOperator logDensity, double lower,
                                 double upper, double center, double spread) {
        return new TailRoot(logCdf, logDensity, false, lower, upper, center, spread);
    }

    /** A solver of {@code logSurvival(x) = target}; parameters as in {@link #ofCdf}. */
    public static TailRoot ofSurvival(DoubleUnaryOperator logSurvival, DoubleUnaryOperator logDensity,
                                      double lower, double upper, double center, double spread) {
        return new TailRoot(logSurvival, logDensity, true, lower, upper, center, spread);
    }

    /**
     * The point where the log tail equals {@code target}.
     *
     * @param target    a log-probability, {@code < 0}
     * @param start     a first guess inside the support (clamped into it)
     * @param tolerance relative tolerance on the mapped variable; {@code 1e-15} for full precision, larger
     *                  values when a rough point is enough
     */
    public double solve(double target, double start, double tolerance) {
        double limit = bothFinite() ? LOGISTIC_LIMIT : SINH_LIMIT;
        double lo = -limit;
        double hi = limit;
        double u = Math.max(lo, Math.min(hi, toU(start)));
        if (!Double.isFinite(u)) {
            u = 0;
        }
        double dxOld = hi - lo;
        double dx = dxOld;
        double[] fd = evaluate(u, target);
        for (int step = 0; step < MAX_STEPS; step++) {
            double f = fd[0];
            double df = fd[1];
            double next = u - f / df;
            boolean newton = Double.isFinite(f) && df > 0 && Double.isFinite(df) && next > lo && next < hi
                    && Math.abs(2 * f) <= Math.abs(dxOld * df);
            dxOld = dx;
            if (newton) {
                dx = f / df;
                u = next;
            } else {
                dx = 0.5 * (hi - lo);
                u = lo + dx;
            }
            if (Math.abs(dx) <= tolerance * Math.max(1, Math.abs(u))) {
                return toX(u);
            }
            fd = evaluate(u, target);
            if (fd[0] < 0) {
                lo = u;
            } else if (fd[0] > 0) {
                hi = u;
            } else {
                return toX(u);
            }
        }
        return toX(u);
    }

    /** {g(u), g'(u)} with g increasing in u and zero at the root. */
    private double[] evaluate(double u, double target) {
        double x = toX(u);
        double tail = logTail.applyAsDouble(x);
        double g = upper ? target - tail : tail - target;
        double slope = StrictMath.exp(logDensity.applyAsDouble(x) - tail) * dxdu(u);
        if (Double.isNaN(g)) {
            throw new ArithmeticException("log tail is NaN at x=" + x);
        }
        return new double[] {g, slope};
    }

    private boolean bothFinite() {
        return Double.isFinite(lower) && Double.isFinite(upperBound);
    }

    private double toX(double u) {
        if (bothFinite()) {
            double width = upperBound - lower;
            if (u >= 0) {
                return lower + width / (1 + StrictMath.exp(-u));
            }
            double e = StrictMath.exp(u);
            return lower + width * e / (1 + e);
        }
        if (Double.isFinite(lower)) {
            return lower + spread * StrictMath.exp(u);
        }
        if (Double.isFinite(upperBound)) {
            return upperBound - spread * StrictMath.exp(-u);
        }
        double x = center + spread * StrictMath.sinh(u);
        return Double.isInfinite(x) ? Math.copySign(Double.MAX_VALUE, x) : x;
    }

    private double toU(double x) {
        if (bothFinite()) {
            double p = (x - lower) / (upperBound - lower);
            return StrictMath.log(p) - StrictMath.log1p(-p);
        }
        if (Double.isFinite(lower)) {
            return StrictMath.log((x - lower) / spread);
        }
        if (Double.isFinite(upperBound)) {
            return -StrictMath.log((upperBound - x) / spread);
        }
        double z = Math.abs(x - center) / spread;
        double asinh = z > 1e150 ? StrictMath.log(z) + StrictMath.log(2) : StrictMath.log(z + StrictMath.sqrt(z * z + 1));
        return x < center ? -asinh : asinh;
    }

    private double dxdu(double u) {
        if (bothFinite()) {
            double e = StrictMath.exp(-Math.abs(u));
            return (upperBound - lower) * e / ((1 + e) * (1 + e));
        }
        if (Double.isFinite(lower)) {
            return spread * StrictMath.exp(u);
        }
        if (Double.isFinite(upperBound)) {
            return spread * StrictMath.exp(-u);
        }
        return spread * StrictMath.cosh(u);
    }
}
