package dev.runoff.engine.special;

/**
 * {@code log I_x(a, b)}, its complement and the log density of Beta(a, b) for one shape pair, as engine
 * version 1.3 evaluates them at the nodes of its integrals. Not thread-safe (it caches the kernel of the last
 * point): one instance per computation.
 *
 * <p>Design: the continued fraction and its forward recurrence are those of {@link IncompleteBeta} (Press
 * et al. 2007, "Numerical Recipes", 3rd ed., eq. 6.4.5 and section 5.2), with two differences.
 * <ul>
 *   <li>Convergence is tested every {@value #CHECK_EVERY} terms, the convergent against the one of the last
 *       test. Testing every term against the previous one stops early where the fraction converges slowly
 *       (near {@code x = (a + 1) / (a + b + 2)}): at {@code a = 408, b = 17913, x = 0.022349158639376615},
 *       {@link IncompleteBeta} gives {@code log I_x = -0.6247032479444007}, 2.3e-13 from mpmath 1.3.0's
 *       {@code -0.62470324794462723} (40 digits), this class {@code -0.624703247944685} (5.8e-14 from
 *       it).</li>
 *   <li>The kernel {@link IncompleteBeta#logKernel} (the cancellation-free form of DiDonato and Morris 1992
 *       for large shapes) is cached for the last point, so that the density and a tail at the same point
 *       compute it once.</li>
 * </ul>
 * The results are not bit for bit those of {@link IncompleteBeta}; the tests hold both to the same outside
 * references.
 */
public final class CachedIncompleteBeta {
    private static final int CHECK_EVERY = 4;

    private final IncompleteBeta beta;
    private double cachedX = Double.NaN;
    private double cachedY = Double.NaN;
    private double cachedKernel;

    /**
     * An evaluator for the shapes of {@code beta}.
     *
     * @param beta the incomplete beta whose shapes and kernel are used
     */
    public CachedIncompleteBeta(IncompleteBeta beta) {
        this.beta = beta;
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
        return beta.logLower(x, y, kernel(x, y), CHECK_EVERY);
    }

    /** {@code log(1 - I_x(a, b))} with {@code y = 1 - x}; as {@link IncompleteBeta#logUpper}. */
    public double logUpper(double x, double y) {
        if (!(y > 0)) {
            return Double.NEGATIVE_INFINITY;
        }
        if (!(x > 0)) {
            return 0.0;
        }
        return beta.logUpper(x, y, kernel(x, y), CHECK_EVERY);
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
