package dev.runoff.engine.best;

import dev.runoff.engine.posterior.Posterior;
import java.util.List;
import org.apache.commons.math3.analysis.integration.gauss.GaussIntegratorFactory;

/**
 * Exact probability that each arm is best, by numerical integration of
 * {@code alpha_i = integral f_i(x) prod_{j != i} F_j(x) dx} over the central {@code 1 - 2e-12} of arm i's
 * posterior. The range is cut at quantiles of arm i (finely in the bulk, geometrically in the tails, so
 * heavy-tailed Student-t posteriors are resolved too) and each piece gets a 16-point Gauss-Legendre rule
 * (Commons Math). Standard errors are 0.
 */
public final class ExactProbabilityBest implements ProbabilityBestEstimator {
    private static final int NODES = 16;
    private static final GaussIntegratorFactory GAUSS = new GaussIntegratorFactory();

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
        double[] cuts = cuts(ps.get(i));
        double sum = 0;
        for (int p = 0; p + 1 < cuts.length; p++) {
            if (cuts[p + 1] > cuts[p]) {
                sum += GAUSS.legendre(NODES, cuts[p], cuts[p + 1]).integrate(x -> integrand(ps, i, x));
            }
        }
        return sum;
    }

    /** Quantiles of {@code p} at 1e-12, 1e-10, ..., 1e-3, then every 1/64, then symmetrically up to 1 - 1e-12. */
    private static double[] cuts(Posterior p) {
        double[] tails = {1e-12, 1e-10, 1e-8, 1e-6, 1e-5, 1e-4, 1e-3, 4e-3};
        int bulk = 63;
        double[] cuts = new double[2 * tails.length + bulk];
        for (int t = 0; t < tails.length; t++) {
            cuts[t] = p.quantile(tails[t]);
            cuts[cuts.length - 1 - t] = p.quantile(1 - tails[t]);
        }
        for (int b = 1; b <= bulk; b++) {
            cuts[tails.length + b - 1] = p.quantile(b / 64.0);
        }
        return cuts;
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
