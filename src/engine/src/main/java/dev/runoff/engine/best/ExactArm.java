package dev.runoff.engine.best;

import dev.runoff.engine.posterior.BetaPosterior;
import dev.runoff.engine.posterior.Posterior;
import dev.runoff.engine.posterior.StudentTPosterior;
import dev.runoff.engine.special.TailRoot;

/**
 * One posterior as seen by the exact integrals: the distribution of {@code theta - shift} (the shift lets
 * the indifference-zone probability use {@code F(x + epsilon)}), its effective range, and the local length
 * scale that sizes the integration panels.
 *
 * <p>Design: the panel width near {@code x} follows the curvature of the log density, so that a Gauss-
 * Legendre panel always spans a bounded number of "local standard deviations": for Beta(a, b) the larger
 * of {@code 1/variance} and end terms {@code |a-1|/y^2 + |b-1|/(1-y)^2} for non-integer shapes (which
 * shrink the panels geometrically towards an end where the density is singular or vanishes like a
 * fractional power); for Student-t, {@code (nu+1) / ((nu + z^2) scale^2)} (geometric panels in heavy tails,
 * about one scale wide in the body). Other posterior types fall back to a normal-like scale from their
 * quartiles.
 */
final class ExactArm {
    private static final double ROUGH_TOLERANCE = 1e-6;
    private static final int WIDENING_ROUNDS = 2;
    private static final double END_GAP = 1e-11;

    private final Posterior posterior;
    /** The Beta posterior behind this arm (itself or the one a {@link Reflected} wraps), or null. */
    private final BetaPosterior beta;
    /** +1, or -1 for a reflected Beta: the Beta variable is {@code sign * (x + shift)}. */
    private final double sign;
    private final double shift;
    private final double center;
    private final double spread;
    private final double lower;
    private final double upper;
    private final boolean capped;
    private final double maxLogDensity;
    private final TailRoot cdfRoot;
    private final TailRoot survivalRoot;

    /**
     * @param posterior the posterior of theta
     * @param shift     the arm is seen as {@code theta - shift}
     * @param logTail   log-probability that defines the range: {@code log F(lower) = log S(upper) = logTail}
     */
    ExactArm(Posterior posterior, double shift, double logTail) {
        this(posterior, shift, logTail, false);
    }

    /**
     * @param posterior       the posterior of theta
     * @param shift           the arm is seen as {@code theta - shift}
     * @param logTail         log-probability that defines the range
     * @param integratedTails widen the range so that the integrated tails {@code E[(lower - theta)^+]} and
     *                        {@code E[(theta - upper)^+]} are below {@code e^logTail} (for expected gains;
     *                        matters for heavy Student-t tails)
     */
    ExactArm(Posterior posterior, double shift, double logTail, boolean integratedTails) {
        this.posterior = posterior;
        this.beta = betaOf(posterior);
        this.sign = posterior instanceof Reflected ? -1 : 1;
        this.shift = shift;
        this.center = centerOf(posterior);
        this.spread = spreadOf(posterior);
        Posterior rooted = posterior instanceof Reflected r ? r.inner() : posterior;
        double rootCenter = sign * center;
        this.cdfRoot = TailRoot.ofCdf(rooted::logCdf, rooted::logDensity, rooted.supportLower(),
                rooted.supportUpper(), rootCenter, spread);
        this.survivalRoot = TailRoot.ofSurvival(rooted::logSurvival, rooted::logDensity,
                rooted.supportLower(), rooted.supportUpper(), rootCenter, spread);
        double lo = lowerAt(logTail);
        double hi = upperAt(logTail);
        for (int round = 0; integratedTails && round < WIDENING_ROUNDS; round++) {
            lo = lowerAt(logTail - Math.max(0, StrictMath.log(residualLength(lo))));
            hi = upperAt(logTail - Math.max(0, StrictMath.log(residualLength(hi))));
        }
        this.lower = lo;
        double cap = upperCap(posterior) - shift;
        this.capped = hi > cap;
        this.upper = Math.min(hi, cap);
        this.maxLogDensity = maxLogDensityOf(posterior);
    }

    private static BetaPosterior betaOf(Posterior p) {
        if (p instanceof BetaPosterior b) {
            return b;
        }
        if (p instanceof CachedBeta c) {
            return c.beta();
        }
        return p instanceof Reflected r ? unreflectedBeta(r.inner()) : null;
    }

    private static BetaPosterior unreflectedBeta(Posterior inner) {
        if (inner instanceof BetaPosterior b) {
            return b;
        }
        return inner instanceof CachedBeta c ? c.beta() : null;
    }

    /** Whether this arm is a Beta posterior (possibly reflected). */
    boolean isBeta() {
        return beta != null;
    }

    /** Whether the density is log-concave: a Beta posterior (possibly reflected) with both shapes at least 1. */
    boolean logConcave() {
        return beta != null && beta.a() >= 1 && beta.b() >= 1;
    }

    /** Whether the range was cut at {@link #upperCap}: some mass lies above it. */
    boolean capped() {
        return capped;
    }

    /**
     * The highest point a range may reach: {@code END_GAP} (relative) below a finite upper end of the
     * support. Doubles just below 1 are spaced 1.1e-16 apart, so Gauss nodes on panels narrower than about
     * 1e-12 there land off their places; a density singular at that end (Beta with {@code b < 1}) would
     * lose up to 1e-8 of its mass to that rounding. The mass above the cap is added by
     * {@code ExactIntegrator} as a closing term.
     */
    private static double upperCap(Posterior p) {
        double top = p.supportUpper();
        if (p instanceof Reflected || !Double.isFinite(top) || !Double.isFinite(p.supportLower())) {
            return Double.POSITIVE_INFINITY;
        }
        return top - END_GAP * (top - p.supportLower());
    }

    /** An upper bound of the log density ({@code +infinity} when none is known cheaply). */
    private static double maxLogDensityOf(Posterior p) {
        if (p instanceof Reflected r) {
            return maxLogDensityOf(r.inner());
        }
        if (p instanceof CachedBeta c) {
            return maxLogDensityOf(c.beta());
        }
        if (p instanceof StudentTPosterior t) {
            return t.logDensity(t.location());
        }
        if (p instanceof BetaPosterior beta && beta.a() >= 1 && beta.b() >= 1) {
            double mode = beta.a() + beta.b() > 2 ? (beta.a() - 1) / (beta.a() + beta.b() - 2) : 0.5;
            return beta.logDensity(mode) + 1e-6;
        }
        return Double.POSITIVE_INFINITY;
    }

    private static double centerOf(Posterior p) {
        if (p instanceof StudentTPosterior t) {
            return t.location();
        }
        if (betaOf(p) != null) {
            return p.mean();
        }
        return p.quantile(0.5);
    }

    private static double spreadOf(Posterior p) {
        if (p instanceof StudentTPosterior t) {
            return t.scale();
        }
        if (betaOf(p) != null) {
            return Math.sqrt(p.variance());
        }
        return (p.quantile(0.75) - p.quantile(0.25)) / 1.349;
    }

    /** The centre of the distribution (location or mean), in shifted coordinates. */
    double center() {
        return center - shift;
    }

    /** Point (in shifted coordinates) below which {@code log F < logTail}. */
    double lower() {
        return lower;
    }

    /** Point (in shifted coordinates) above which {@code log S < logTail}. */
    double upper() {
        return upper;
    }

    /**
     * The point where {@code log F = logTarget}, to about six digits. The roots of a {@link Reflected} arm
     * are solved on the posterior it wraps ({@code log F(x) = log S_inner(-x)}), where points near 0 keep
     * their relative precision.
     */
    double lowerAt(double logTarget) {
        double z = Math.sqrt(-2 * logTarget);
        if (sign < 0) {
            return -survivalRoot.solve(logTarget, normalGuess(z), ROUGH_TOLERANCE) - shift;
        }
        return cdfRoot.solve(logTarget, normalGuess(-z), ROUGH_TOLERANCE) - shift;
    }

    /** The point where {@code log S = logTarget}, to about six digits (see {@link #lowerAt}). */
    double upperAt(double logTarget) {
        double z = Math.sqrt(-2 * logTarget);
        if (sign < 0) {
            return -cdfRoot.solve(logTarget, normalGuess(-z), ROUGH_TOLERANCE) - shift;
        }
        return survivalRoot.solve(logTarget, normalGuess(z), ROUGH_TOLERANCE) - shift;
    }

    /**
     * {@code c + z * spread} for the centre {@code c} of the posterior the roots are solved on, if inside
     * its support, else {@code c}: a first guess for a tail point.
     */
    private double normalGuess(double z) {
        Posterior rooted = posterior instanceof Reflected r ? r.inner() : posterior;
        double c = sign * center;
        double guess = c + z * spread;
        return guess > rooted.supportLower() && guess < rooted.supportUpper() ? guess : c;
    }

    /**
     * A rough upper bound of the mean residual length {@code E[theta - x | theta > x]} (or of {@code x -
     * theta} below {@code x}): the support width for Beta, and for Student-t about {@code |z| scale / (nu -
     * 1)} (from the tail {@code S(z) ~ z^-nu}), doubled for safety. Used only to widen truncation points of
     * integrals of tails, never in a result.
     */
    double residualLength(double x) {
        Posterior p = posterior;
        if (p instanceof StudentTPosterior t) {
            double z = Math.abs(x + shift - t.location()) / t.scale();
            return 2 * t.scale() * (1 + z) / Math.max(t.dof() - 1, 1e-3);
        }
        if (Double.isFinite(p.supportLower()) && Double.isFinite(p.supportUpper())) {
            return p.supportUpper() - p.supportLower();
        }
        return 2 * spread * (1 + Math.abs(x + shift - center) / spread);
    }

    /** An upper bound of the log density. */
    double maxLogDensity() {
        return maxLogDensity;
    }

    double logDensity(double x) {
        return posterior.logDensity(x + shift);
    }

    double logCdf(double x) {
        return posterior.logCdf(x + shift);
    }

    double logSurvival(double x) {
        return posterior.logSurvival(x + shift);
    }

    /** Whether this arm's factors vary at {@code x} (outside its range they are 0 or 1 in effect). */
    boolean active(double x) {
        return x >= lower && x <= upper;
    }

    /** Curvature (inverse squared length scale) of the log density at {@code x}. */
    double curvature(double x) {
        double y = x + shift;
        if (beta != null) {
            double u = sign * y;
            return Math.max(1 / beta.variance(), endTerm(beta.a(), u) + endTerm(beta.b(), 1 - u));
        }
        if (posterior instanceof StudentTPosterior t) {
            double z = (y - t.location()) / t.scale();
            return (t.dof() + 1) / ((t.dof() + z * z) * t.scale() * t.scale());
        }
        return 1 / (spread * spread);
    }

    /**
     * Distance from {@code x} to the nearest end of the support where the log density has an end term
     * ({@link #endTerm}: a Beta end with a non-integer shape); infinity when there is none.
     */
    double endDistance(double x) {
        double d = Double.POSITIVE_INFINITY;
        if (beta != null) {
            double u = sign * (x + shift);
            if (hasEndTerm(beta.a())) {
                d = u;
            }
            if (hasEndTerm(beta.b())) {
                d = Math.min(d, 1 - u);
            }
        }
        return Math.max(0, d);
    }

    /**
     * The coefficient {@code c} of the end term {@code c / distance^2} of the support end nearest to
     * {@code x} (0 when there is none): {@code max(|shape - 1|, 1/4)}.
     */
    double endCoefficient(double x) {
        if (beta == null) {
            return 0;
        }
        double u = sign * (x + shift);
        double shape = u <= 0.5 ? beta.a() : beta.b();
        return hasEndTerm(shape) ? Math.max(Math.abs(shape - 1), 0.25) : 0;
    }

    private static boolean hasEndTerm(double shape) {
        return !(shape >= 1 && shape == Math.rint(shape));
    }

    /**
     * Curvature term of an end of the Beta support at {@code distance} from it, where the density behaves
     * like {@code distance^(shape-1)}: none for an integer shape (the factor is a polynomial, which
     * Gauss-Legendre integrates exactly), otherwise {@code max(|shape-1|, 1/4) / distance^2} so the panels
     * shrink geometrically towards that end.
     */
    private static double endTerm(double shape, double distance) {
        if (!hasEndTerm(shape)) {
            return 0;
        }
        return Math.max(Math.abs(shape - 1), 0.25) / (distance * distance);
    }

    /**
     * Curvature of the log distribution function at {@code x}, approximated as the density's curvature
     * below the centre, fading as {@code 1/(1+z^2)} above it where {@code F} flattens towards 1.
     */
    double cdfCurvature(double x) {
        double z = (x + shift - center) / spread;
        double c = curvature(x);
        return z <= 0 ? c : c / (1 + z * z);
    }
}
