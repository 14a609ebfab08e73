package dev.runoff.engine.posterior;

import dev.runoff.engine.core.Checks;
import dev.runoff.engine.special.IncompleteBeta;
import dev.runoff.engine.special.TailRoot;
import org.apache.commons.rng.UniformRandomProvider;

/**
 * Beta(a, b) posterior of a Bernoulli rate. Immutable value: equal when both parameters are equal.
 *
 * <p>The distribution function is the regularized incomplete beta function {@code I_x(a, b)}, evaluated
 * in log space by {@link IncompleteBeta} (constants such as {@code log B(a, b)} computed once here), so
 * tails far below {@code 1e-300} keep their relative accuracy.
 */
public final class BetaPosterior implements Posterior {
    private static final double QUANTILE_TOLERANCE = 1e-15;

    private final double a;
    private final double b;
    private final IncompleteBeta beta;

    /**
     * @param a first shape parameter, finite and {@code > 0}
     * @param b second shape parameter, finite and {@code > 0}
     */
    public BetaPosterior(double a, double b) {
        this.a = Checks.positive("Beta posterior a", a);
        this.b = Checks.positive("Beta posterior b", b);
        this.beta = new IncompleteBeta(a, b);
    }

    /** The log-space incomplete beta function of this posterior's shapes (immutable, shared). */
    public IncompleteBeta incompleteBeta() {
        return beta;
    }

    /** The first shape parameter. */
    public double a() {
        return a;
    }

    /** The second shape parameter. */
    public double b() {
        return b;
    }

    @Override
    public double mean() {
        return a / (a + b);
    }

    @Override
    public double variance() {
        double s = a + b;
        return a * b / (s * s * (s + 1));
    }

    @Override
    public double supportLower() {
        return 0.0;
    }

    @Override
    public double supportUpper() {
        return 1.0;
    }

    @Override
    public double logDensity(double x) {
        if (!(x >= 0 && x <= 1)) {
            return Double.NEGATIVE_INFINITY;
        }
        if (x == 0) {
            return boundaryLogDensity(a);
        }
        if (x == 1) {
            return boundaryLogDensity(b);
        }
        return beta.logDensity(x, 1 - x);
    }

    /** The log density at the end of the support where the exponent is {@code shape - 1}. */
    private double boundaryLogDensity(double shape) {
        if (shape < 1) {
            return Double.POSITIVE_INFINITY;
        }
        return shape == 1 ? -beta.logBeta() : Double.NEGATIVE_INFINITY;
    }

    @Override
    public double logCdf(double x) {
        if (!(x > 0)) {
            return Double.NEGATIVE_INFINITY;
        }
        if (x >= 1) {
            return 0.0;
        }
        return beta.logLower(x, 1 - x);
    }

    @Override
    public double logSurvival(double x) {
        if (!(x > 0)) {
            return 0.0;
        }
        if (x >= 1) {
            return Double.NEGATIVE_INFINITY;
        }
        return beta.logUpper(x, 1 - x);
    }

    /**
     * The {@code p}-quantile, solved in log space from the smaller tail (so quantiles of {@code p = 1e-200}
     * or {@code 1 - 1e-16} are accurate).
     */
    @Override
    public double quantile(double p) {
        Checks.inOpenRange("p", p, 0, 1);
        double spread = Math.sqrt(variance());
        if (p <= 0.5) {
            return TailRoot.ofCdf(this::logCdf, this::logDensity, 0, 1, mean(), spread)
                    .solve(StrictMath.log(p), mean(), QUANTILE_TOLERANCE);
        }
        return TailRoot.ofSurvival(this::logSurvival, this::logDensity, 0, 1, mean(), spread)
                .solve(StrictMath.log1p(-p), mean(), QUANTILE_TOLERANCE);
    }

    @Override
    public Sampler sampler(UniformRandomProvider rng) {
        return Samplers.beta(rng, a, b);
    }

    @Override
    public boolean equals(Object o) {
        return o instanceof BetaPosterior p && Double.compare(a, p.a) == 0 && Double.compare(b, p.b) == 0;
    }

    @Override
    public int hashCode() {
        return 31 * Double.hashCode(a) + Double.hashCode(b);
    }

    @Override
    public String toString() {
        return "BetaPosterior[a=" + a + ", b=" + b + "]";
    }
}
