package dev.runoff.engine.best;

import dev.runoff.engine.posterior.Posterior;
import java.util.List;
import org.apache.commons.math3.analysis.integration.gauss.GaussIntegratorFactory;

/**
 * Exact probability that each arm is best, by numerical integration of
 * {@code alpha_i = integral f_i(x) prod_{j != i} F_j(x) dx} over the central {@code 1 - 2e-12} of arm i's
 * posterior, with a 16-point Gauss-Legendre rule (Commons Math) on each of 32 equal sub-intervals. Standard errors are 0.
 */
public final class ExactProbabilityBest implements ProbabilityBestEstimator {
    private static final double TAIL = 1e-12;
    private static final int NODES = 16;
    private static final GaussIntegratorFactory GAUSS = new GaussIntegratorFactory();
    private static final int PIECES = 32;

    /** An exact estimator. */
    public ExactProbabilityBest() {
        // stateless
    }

    @Override
    public ProbabilityBest estimate(List<? extends Posterior> posteriors, long seed) {
        int k = posteriors.size();
        if (k < 2) {
            throw new IllegalArgumentException("at least two posteriors are needed, got " + k);
        }
        double[] alpha = new double[k];
        for (int i = 0; i < k; i++) {
            alpha[i] = alpha(posteriors, i);
        }
        return new ProbabilityBest(alpha, new double[k], ProbabilityBest.Method.EXACT, 0);
    }

    private static double alpha(List<? extends Posterior> ps, int i) {
        Posterior pi = ps.get(i);
        double lo = pi.quantile(TAIL);
        double hi = pi.quantile(1 - TAIL);
        double step = (hi - lo) / PIECES;
        double sum = 0;
        for (int p = 0; p < PIECES; p++) {
            double a = lo + p * step;
            double b = p == PIECES - 1 ? hi : a + step;
            sum += GAUSS.legendre(NODES, a, b).integrate(x -> integrand(ps, i, x));
        }
        return sum;
    }

    private static double integrand(List<? extends Posterior> ps, int i, double x) {
        double log = ps.get(i).logDensity(x);
        for (int j = 0; j < ps.size() && log > Double.NEGATIVE_INFINITY; j++) {
            if (j != i) {
                log += ps.get(j).logCdf(x);
            }
        }
        return StrictMath.exp(log);
    }
}
