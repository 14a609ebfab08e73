package dev.runoff.engine.posterior;

import dev.runoff.engine.core.Checks;
import dev.runoff.engine.special.IncompleteBeta;
import dev.runoff.engine.special.LogMath;
import dev.runoff.engine.special.TailRoot;
import org.apache.commons.rng.UniformRandomProvider;

/**
 * Location-scale Student-t posterior of the mean of a value metric. Immutable value: equal when all three
 * parameters are equal.
 *
 * <p>With {@code z = (x - location) / scale} and {@code nu} degrees of freedom, the standard density is
 * {@code (1 + z^2/nu)^(-(nu+1)/2) / (sqrt(nu) B(nu/2, 1/2))} and, for {@code z <= 0},
 * {@code P(T <= z) = I_{nu/(nu+z^2)}(nu/2, 1/2) / 2} (Abramowitz and Stegun 1964, eq. 26.7.1 with 26.5.27);
 * the other tail follows by symmetry, so both tails are computed directly in log space. Writing the
 * normalising constant as {@code B(nu/2, 1/2)} instead of a ratio of gamma functions avoids the cancellation
 * of two large log-gammas when {@code nu} is large.
 */
public final class StudentTPosterior implements Posterior {
    private static final double QUANTILE_TOLERANCE = 1e-15;
    private static final double LOG_HALF = -0.6931471805599453;
    private static final double HUGE_Z = 1e150;

    private final double location;
    private final double scale;
    private final double dof;
    private final IncompleteBeta beta;
    private final double logNormalizer;

    /**
     * @param location location (the posterior mean when {@code dof > 1}), finite
     * @param scale    scale, finite and {@code > 0}
     * @param dof      degrees of freedom, finite and {@code > 0}
     */
    public StudentTPosterior(double location, double scale, double dof) {
        this.location = Checks.finite("Student-t location", location);
        this.scale = Checks.positive("Student-t scale", scale);
        this.dof = Checks.positive("Student-t degrees of freedom", dof);
        this.beta = new IncompleteBeta(dof / 2, 0.5);
        this.logNormalizer = -0.5 * StrictMath.log(dof) - beta.logBeta() - StrictMath.log(scale);
    }

    /** The location. */
    public double location() {
        return location;
    }

    /** The scale. */
    public double scale() {
        return scale;
    }

    /** The degrees of freedom. */
    public double dof() {
        return dof;
    }

    @Override
    public double mean() {
        return dof > 1 ? location : Double.NaN;
    }

    @Override
    public double variance() {
        if (dof > 2) {
            return scale * scale * dof / (dof - 2);
        }
        return dof > 1 ? Double.POSITIVE_INFINITY : Double.NaN;
    }

    @Override
    public double supportLower() {
        return Double.NEGATIVE_INFINITY;
    }

    @Override
    public double supportUpper() {
        return Double.POSITIVE_INFINITY;
    }

    @Override
    public double logDensity(double x) {
        return standardLogDensity((x - location) / scale) + logNormalizer;
    }

    @Override
    public double logCdf(double x) {
        return standardLogCdf((x - location) / scale);
    }

    @Override
    public double logSurvival(double x) {
        return standardLogCdf((location - x) / scale);
    }

    /**
     * The {@code p}-quantile, solved in log space on the lower tail of the standard t and mirrored for
     * {@code p > 1/2} (where {@code 1 - p} is exact), so extreme quantiles stay accurate.
     */
    @Override
    public double quantile(double p) {
        Checks.inOpenRange("p", p, 0, 1);
        if (p == 0.5) {
            return location;
        }
        double tail = p < 0.5 ? p : 1 - p;
        double z = TailRoot.ofCdf(this::standardLogCdf, z1 -> standardLogDensity(z1) - beta.logBeta()
                        - 0.5 * StrictMath.log(dof), Double.NEGATIVE_INFINITY, Double.POSITIVE_INFINITY, 0, 1)
                .solve(StrictMath.log(tail), -1, QUANTILE_TOLERANCE);
        return p < 0.5 ? location + scale * z : location - scale * z;
    }

    @Override
    public Sampler sampler(UniformRandomProvider rng) {
        return Samplers.studentT(rng, location, scale, dof);
    }

    /** Log of the unnormalised standard density {@code (1 + z^2/nu)^(-(nu+1)/2)}. */
    private double standardLogDensity(double z) {
        double az = Math.abs(z);
        double log1pQ = az > HUGE_Z
                ? 2 * StrictMath.log(az) - StrictMath.log(dof)
                : StrictMath.log1p(az * az / dof);
        return -0.5 * (dof + 1) * log1pQ;
    }

    /** {@code log P(T <= z)} for the standard t. */
    private double standardLogCdf(double z) {
        if (Double.isNaN(z)) {
            return Double.NaN;
        }
        if (z <= 0) {
            return lowerTail(z);
        }
        return LogMath.log1mExp(lowerTail(-z));
    }

    /** {@code log P(T <= z)} for {@code z <= 0}: {@code log(I_x(nu/2, 1/2) / 2)}, {@code x = nu/(nu+z^2)}. */
    private double lowerTail(double z) {
        double az = -z;
        double x;
        double y;
        if (az > HUGE_Z) {
            x = dof / az / az;
            y = 1;
        } else {
            double z2 = az * az;
            x = dof / (dof + z2);
            y = z2 / (dof + z2);
        }
        return LOG_HALF + beta.logLower(x, y);
    }

    @Override
    public boolean equals(Object o) {
        return o instanceof StudentTPosterior p && Double.compare(location, p.location) == 0
                && Double.compare(scale, p.scale) == 0 && Double.compare(dof, p.dof) == 0;
    }

    @Override
    public int hashCode() {
        return (31 * Double.hashCode(location) + Double.hashCode(scale)) * 31 + Double.hashCode(dof);
    }

    @Override
    public String toString() {
        return "StudentTPosterior[location=" + location + ", scale=" + scale + ", dof=" + dof + "]";
    }
}
