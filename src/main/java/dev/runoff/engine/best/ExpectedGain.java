package dev.runoff.engine.best;

import dev.runoff.engine.posterior.Posterior;
import java.util.List;
import java.util.function.DoubleUnaryOperator;
import org.apache.commons.math3.analysis.integration.gauss.GaussIntegratorFactory;

/**
 * Expected gains of one arm over others under independent posteriors, by numerical integration of
 * survival and distribution functions: for independent X and Y, {@code E[(X - Y)^+] = integral
 * P(X > t) P(Y <= t) dt}, and {@code E[(X - c)^+] = integral_c^infinity P(X > t) dt}. Integrals run over
 * the central {@code 1 - 2e-12} of the posteriors involved (16-point Gauss-Legendre rule from Commons Math on each of 64 equal sub-intervals).
 */
public final class ExpectedGain {
    private static final double TAIL = 1e-12;
    private static final int NODES = 16;
    private static final GaussIntegratorFactory GAUSS = new GaussIntegratorFactory();
    private static final int PIECES = 64;

    private ExpectedGain() {
    }

    /**
     * The value of being best, {@code V_i = E[(theta_i - max_{j != i} theta_j)^+]}, for each posterior.
     *
     * @param ps at least two independent posteriors
     */
    public static double[] valueOfBeingBest(List<? extends Posterior> ps) {
        if (ps.size() < 2) {
            throw new IllegalArgumentException("at least two posteriors are needed, got " + ps.size());
        }
        double lo = Double.POSITIVE_INFINITY;
        double hi = Double.NEGATIVE_INFINITY;
        for (Posterior p : ps) {
            lo = Math.min(lo, p.quantile(TAIL));
            hi = Math.max(hi, p.quantile(1 - TAIL));
        }
        double[] v = new double[ps.size()];
        for (int i = 0; i < v.length; i++) {
            int arm = i;
            v[i] = integrate(t -> StrictMath.exp(ps.get(arm).logSurvival(t) + logCdfOfOthers(ps, arm, t)), lo, hi);
        }
        return v;
    }

    /** {@code E[(theta_x - theta_y)^+]} for independent posteriors x and y. */
    public static double pairwise(Posterior x, Posterior y) {
        double lo = Math.min(x.quantile(TAIL), y.quantile(TAIL));
        double hi = Math.max(x.quantile(1 - TAIL), y.quantile(1 - TAIL));
        return integrate(t -> StrictMath.exp(x.logSurvival(t) + y.logCdf(t)), lo, hi);
    }

    /** {@code E[(theta_x - c)^+]}. */
    public static double overThreshold(Posterior x, double c) {
        double lo = x.quantile(TAIL);
        double hi = x.quantile(1 - TAIL);
        if (c >= hi) {
            return 0.0;
        }
        double below = Math.max(0.0, lo - c);
        return below + integrate(t -> StrictMath.exp(x.logSurvival(t)), Math.max(c, lo), hi);
    }

    private static double logCdfOfOthers(List<? extends Posterior> ps, int i, double t) {
        double log = 0;
        for (int j = 0; j < ps.size() && log > Double.NEGATIVE_INFINITY; j++) {
            if (j != i) {
                log += ps.get(j).logCdf(t);
            }
        }
        return log;
    }

    private static double integrate(DoubleUnaryOperator f, double lo, double hi) {
        double step = (hi - lo) / PIECES;
        double sum = 0;
        for (int p = 0; p < PIECES; p++) {
            double a = lo + p * step;
            double b = p == PIECES - 1 ? hi : a + step;
            sum += GAUSS.legendre(NODES, a, b).integrate(f::applyAsDouble);
        }
        return sum;
    }
}
