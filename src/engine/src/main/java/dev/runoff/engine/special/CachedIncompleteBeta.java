package dev.runoff.engine.special;

/**
 * {@code log I_x(a, b)}, its complement and the log density of Beta(a, b) for one shape pair, as engine
 * version 1.3 evaluates them at the nodes of its integrals, which visit increasing points. Not thread-safe (it
 * keeps the last point): one instance per computation.
 *
 * <p>Design:
 * <ul>
 *   <li>Steps. For shapes of at least {@value #STEP_SHAPES}, a point at most {@value #STEP_LENGTH} standard
 *       deviations above the last one gets {@code log I_x} by a Taylor step from it ({@link #stepped}), up to
 *       {@value #STEPS} steps in a row; otherwise, and then, the continued fraction of
 *       {@link IncompleteBeta} (Press et al. 2007, "Numerical Recipes", 3rd ed., eq. 6.4.5) gives it (39.5
 *       terms per call on average in 1.2's integrations of the recompute pool, src/docs/performance.md; the
 *       steps' terms were not counted). Stepped values agree with the fraction's within 3e-13 (CachedIncompleteBetaTest), the size of the
 *       fraction's own error there: at {@code a = 408, b = 17913, x = 0.022349158639376615} it gives
 *       {@code log I_x = -0.6247032479444}, 2.3e-13 from mpmath 1.3.0's {@code -0.62470324794462723}.</li>
 *   <li>The kernel {@link IncompleteBeta#logKernel} (the cancellation-free form of DiDonato and Morris 1992
 *       for large shapes) is kept for the last point, so that the density and a tail at the same point
 *       compute it once.</li>
 * </ul>
 * The results are not bit for bit those of {@link IncompleteBeta}; the tests hold both to the same outside
 * references.
 */
public final class CachedIncompleteBeta {
    /** Smallest shapes for which steps are taken (both shapes; the kernel's large-shape form starts there). */
    private static final double STEP_SHAPES = 8;
    /** Longest step, in standard deviations of the distribution. */
    private static final double STEP_LENGTH = 0.5;
    /** Steps only within this many standard deviations of the mean (the ranges end within about 11). */
    private static final double STEP_ZONE = 12;
    /** Steps at most from one value of the continued fraction to the next. */
    private static final int STEPS = 16;
    /**
     * Longest step as a share of the distance from the last point to the nearer end of the support, the
     * radius of convergence of the density's series there (its singular points are 0 and 1).
     */
    private static final double RADIUS_SHARE = 0.25;
    private static final int MAX_TERMS = 60;
    private static final double TERM_TOLERANCE = 1e-17;

    private final IncompleteBeta beta;
    private final double mean;
    private final double spread;
    private final boolean steps;
    private double cachedX = Double.NaN;
    private double cachedY = Double.NaN;
    private double cachedKernel;
    private double lastX = Double.NaN;
    private double lastLogLower;
    private double lastLogDensity;
    private int chained;

    /**
     * An evaluator for the shapes of {@code beta}.
     *
     * @param beta the incomplete beta whose shapes and kernel are used
     */
    public CachedIncompleteBeta(IncompleteBeta beta) {
        this.beta = beta;
        double a = beta.a();
        double b = beta.b();
        this.mean = a / (a + b);
        this.spread = Math.sqrt(a * b / ((a + b) * (a + b) * (a + b + 1)));
        this.steps = Math.min(a, b) >= STEP_SHAPES;
    }

    /** The incomplete beta whose shapes and kernel this uses. */
    public IncompleteBeta beta() {
        return beta;
    }

    /** {@code log I_x(a, b)} with {@code y = 1 - x}; as {@link IncompleteBeta#logLower}. */
    public double logLower(double x, double y) {
        if (!(x > 0)) {
            return Double.NEGATIVE_INFINITY;
        }
        if (!(y > 0)) {
            return 0.0;
        }
        double logLower;
        double h = x - lastX;
        if (steps && h > 0 && h <= STEP_LENGTH * spread && chained < STEPS
                && Math.abs(x - mean) <= STEP_ZONE * spread && h <= RADIUS_SHARE * Math.min(lastX, 1 - lastX)) {
            logLower = stepped(lastX, h);
            chained++;
        } else {
            logLower = beta.logLower(x, y, kernel(x, y));
            chained = 0;
        }
        lastX = x;
        lastLogLower = logLower;
        lastLogDensity = steps ? logDensity(x, y) : Double.NaN;
        return logLower;
    }

    /**
     * {@code log I_{x0 + h}} from {@code log I_{x0}} and the log density at {@code x0}: the Taylor series of
     * the density about {@code x0}, integrated term by term. The density solves
     * {@code x (1 - x) f' = ((a - 1) - (a + b - 2) x) f}, so with {@code x = x0 + t} its coefficients
     * {@code f(x0 + t) = f(x0) sum_k c_k t^k} follow {@code c_0 = 1}, {@code c_-1 = 0},
     * {@code c_k+1 = ((C - B k) c_k + (D + k - 1) c_k-1) / (A (k + 1))} with {@code A = x0 (1 - x0)},
     * {@code B = 1 - 2 x0}, {@code C = (a - 1) - (a + b - 2) x0}, {@code D = -(a + b - 2)} (equate the powers
     * of t on both sides; a power series about an ordinary point of the equation, which converges up to the
     * nearer singular point, 0 or 1: steps are at most {@value #RADIUS_SHARE} of that distance). Then {@code I_x = I_x0 (1 + (f(x0) / I_x0) h sum_k c_k h^k / (k + 1))}.
     */
    private double stepped(double x0, double h) {
        double a = beta.a();
        double b = beta.b();
        double coefA = x0 * (1 - x0);
        double coefB = 1 - 2 * x0;
        double coefC = (a - 1) - (a + b - 2) * x0;
        double coefD = -(a + b - 2);
        double previous = 0;
        double current = 1;
        double sum = 1;
        double k = 0;
        for (int term = 0; term < MAX_TERMS; term++) {
            double next = ((coefC - coefB * k) * current * h + (coefD + k - 1) * previous * h * h)
                    / (coefA * (k + 1));
            k += 1;
            double add = next / (k + 1);
            sum += add;
            if (Math.abs(add) <= TERM_TOLERANCE * Math.abs(sum) && Math.abs(next) <= Math.abs(current)) {
                double ratio = StrictMath.exp(lastLogDensity - lastLogLower);
                return lastLogLower + StrictMath.log1p(ratio * h * sum);
            }
            previous = current;
            current = next;
        }
        chained = STEPS;
        return beta.logLower(x0 + h, 1 - (x0 + h), kernel(x0 + h, 1 - (x0 + h)));
    }

    /** {@code log(1 - I_x(a, b))} with {@code y = 1 - x}; as {@link IncompleteBeta#logUpper}. */
    public double logUpper(double x, double y) {
        if (!(y > 0)) {
            return Double.NEGATIVE_INFINITY;
        }
        if (!(x > 0)) {
            return 0.0;
        }
        return beta.logUpper(x, y, kernel(x, y));
    }

    /**
     * The log density at {@code x} with {@code y = 1 - x}, both in {@code (0, 1)}; as
     * {@link IncompleteBeta#logDensity}.
     */
    public double logDensity(double x, double y) {
        return kernel(x, y) - IncompleteBeta.logOf(x, y) - IncompleteBeta.logOf(y, x);
    }

    private double kernel(double x, double y) {
        if (x != cachedX || y != cachedY) {
            cachedKernel = beta.logKernel(x, y);
            cachedX = x;
            cachedY = y;
        }
        return cachedKernel;
    }
}
