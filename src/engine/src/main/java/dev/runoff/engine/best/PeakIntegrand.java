package dev.runoff.engine.best;

import dev.runoff.engine.posterior.BetaPosterior;
import dev.runoff.engine.special.CachedIncompleteBeta;
import java.util.List;

/**
 * The log integrand {@code phi_i(x) = log f_i(x) + sum_{j != i} log F_j(x)} of one arm's probability of being
 * best, over Beta posteriors with both shapes at least 1, for {@link PeakQuadrature}: its value, and for the
 * search of its peak its first two derivatives, from
 * <pre>
 *   (log f_j)'  = (a_j - 1) / x - (b_j - 1) / (1 - x),   (log f_j)'' = -(a_j - 1) / x^2 - (b_j - 1) / (1 - x)^2
 *   (log F_j)'  = r_j = f_j / F_j,                        (log F_j)'' = r_j ((log f_j)' - r_j)
 * </pre>
 * (differentiate {@code log F_j}; {@code F_j' = f_j}). The distribution functions come from one
 * {@link CachedIncompleteBeta} per arm (Taylor steps between increasing points, as engine 1.3); along a sweep
 * of increasing points an arm whose {@code log F_j} has come within {@value #SATURATED} of 0 is taken as 0 from
 * there on ({@code F_j} increases, and so little no longer moves a log integrand of size 1 or more by one ulp).
 * Not thread-safe: one instance per integral.
 */
final class PeakIntegrand implements LogIntegrand {
    /** {@code log F_j} above this is taken as 0 for every later point of a sweep. */
    static final double SATURATED = -1e-17;

    private final List<BetaPosterior> arms;
    private final int own;
    private final double[] a;
    private final double[] b;
    private final CachedIncompleteBeta[] cdfs;
    private final boolean[] saturated;

    /** The integrand of arm {@code own} over {@code arms}. */
    PeakIntegrand(List<BetaPosterior> arms, int own) {
        this.arms = arms;
        int n = arms.size();
        this.own = own;
        this.a = new double[n];
        this.b = new double[n];
        this.cdfs = new CachedIncompleteBeta[n];
        this.saturated = new boolean[n];
        for (int j = 0; j < n; j++) {
            a[j] = arms.get(j).a();
            b[j] = arms.get(j).b();
            cdfs[j] = new CachedIncompleteBeta(arms.get(j).incompleteBeta());
        }
    }

    /** The same integrand with fresh caches and no arm saturated (for a sweep from a lower point). */
    PeakIntegrand fresh() {
        return new PeakIntegrand(arms, own);
    }

    /** The arms of this integrand. */
    List<BetaPosterior> arms() {
        return arms;
    }

    /** The arm whose probability of being best this integrand gives. */
    int own() {
        return own;
    }

    /** The number of arms. */
    int count() {
        return a.length;
    }

    /** {@code phi(x)} for {@code 0 < x < 1}, at points visited in increasing order (saturated arms skipped). */
    @Override
    public double sweep(double x) {
        double y = 1 - x;
        double phi = cdfs[own].logDensity(x, y);
        for (int j = 0; j < a.length; j++) {
            if (j != own && !saturated[j]) {
                double logF = cdfs[j].logLower(x, y);
                saturated[j] = logF > SATURATED;
                phi += logF;
            }
        }
        return phi;
    }

    /**
     * {@code phi(x)}, {@code phi'(x)} and {@code phi''(x)} for {@code 0 < x < 1}, into {@code out}; any point,
     * no saturation.
     */
    void derivatives(double x, double[] out) {
        double y = 1 - x;
        double phi = cdfs[own].logDensity(x, y);
        double first = slope(own, x, y);
        double second = bend(own, x, y);
        for (int j = 0; j < a.length; j++) {
            if (j != own) {
                double logF = cdfs[j].logLower(x, y);
                double r = StrictMath.exp(cdfs[j].logDensity(x, y) - logF);
                phi += logF;
                first += r;
                second += r * (slope(j, x, y) - r);
            }
        }
        out[0] = phi;
        out[1] = first;
        out[2] = second;
    }

    /**
     * A bound of the curvature {@code -phi''} near {@code x} that sizes the panels, as engine 1.3 sizes them
     * ({@code ExactArm#curvature}, {@code ExactArm#cdfCurvature}): the own density's curvature, at least
     * {@code 1 / variance}, plus each other arm's, fading as {@code 1 / (1 + z^2)} above that arm's mean where
     * {@code F_j} flattens towards 1.
     */
    double curvature(double x) {
        double y = 1 - x;
        double k = Math.max(-bend(own, x, y), 1 / variance(own));
        for (int j = 0; j < a.length; j++) {
            if (j != own) {
                double c = Math.max(-bend(j, x, y), 1 / variance(j));
                double z = (x - mean(j)) / Math.sqrt(variance(j));
                k += z <= 0 ? c : c / (1 + z * z);
            }
        }
        return k;
    }

    /** The mean of arm {@code j}. */
    double mean(int j) {
        return a[j] / (a[j] + b[j]);
    }

    /** The variance of arm {@code j}. */
    double variance(int j) {
        double s = a[j] + b[j];
        return a[j] * b[j] / (s * s * (s + 1));
    }

    /** The mode of arm {@code j}'s density (shapes at least 1). */
    double mode(int j) {
        double s = a[j] + b[j];
        return s > 2 ? (a[j] - 1) / (s - 2) : 0.5;
    }

    private double slope(int j, double x, double y) {
        return (a[j] - 1) / x - (b[j] - 1) / y;
    }

    private double bend(int j, double x, double y) {
        return -(a[j] - 1) / (x * x) - (b[j] - 1) / (y * y);
    }
}
