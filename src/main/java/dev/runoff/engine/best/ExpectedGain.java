package dev.runoff.engine.best;

import dev.runoff.engine.posterior.Posterior;
import java.util.Arrays;
import java.util.List;
import java.util.function.DoubleUnaryOperator;
import java.util.stream.DoubleStream;
import org.apache.commons.math3.analysis.integration.gauss.GaussIntegratorFactory;

/**
 * Expected gains of one arm over others under independent posteriors, by numerical integration of
 * survival and distribution functions: for independent X and Y, {@code E[(X - Y)^+] = integral
 * P(X > t) P(Y <= t) dt}, and {@code E[(X - c)^+] = integral_c^infinity P(X > t) dt}. Integrals run over
 * the central {@code 1 - 2e-12} of the posteriors involved, cut at their quantiles (finely in the bulk,
 * geometrically in the tails) with a 16-point Gauss-Legendre rule (Commons Math) on each piece.
 */
public final class ExpectedGain {
    private static final int NODES = 16;
    private static final GaussIntegratorFactory GAUSS = new GaussIntegratorFactory();

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
        double[] cuts = cuts(ps.toArray(Posterior[]::new));
        double[] v = new double[ps.size()];
        for (int i = 0; i < v.length; i++) {
            int arm = i;
            v[i] = integrate(t -> StrictMath.exp(ps.get(arm).logSurvival(t) + logCdfOfOthers(ps, arm, t)), cuts);
        }
        return v;
    }

    /** {@code E[(theta_x - theta_y)^+]} for independent posteriors x and y. */
    public static double pairwise(Posterior x, Posterior y) {
        return integrate(t -> StrictMath.exp(x.logSurvival(t) + y.logCdf(t)), cuts(x, y));
    }

    /** {@code E[(theta_x - c)^+]}. */
    public static double overThreshold(Posterior x, double c) {
        double[] cuts = cuts(x);
        double lo = cuts[0];
        double[] above = DoubleStream.concat(DoubleStream.of(Math.max(c, lo)),
                Arrays.stream(cuts).filter(t -> t > c)).toArray();
        return Math.max(0.0, lo - c) + integrate(t -> StrictMath.exp(x.logSurvival(t)), above);
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

    /** Sorted quantiles of every posterior at 1e-12, ..., 4e-3, every 1/64, ..., 1 - 1e-12. */
    private static double[] cuts(Posterior... ps) {
        double[] tails = {1e-12, 1e-10, 1e-8, 1e-6, 1e-5, 1e-4, 1e-3, 4e-3};
        DoubleStream.Builder all = DoubleStream.builder();
        for (Posterior p : ps) {
            for (double t : tails) {
                all.add(p.quantile(t)).add(p.quantile(1 - t));
            }
            for (int b = 1; b < 64; b++) {
                all.add(p.quantile(b / 64.0));
            }
        }
        return all.build().sorted().distinct().toArray();
    }

    private static double integrate(DoubleUnaryOperator f, double[] cuts) {
        double sum = 0;
        for (int p = 0; p + 1 < cuts.length; p++) {
            if (cuts[p + 1] > cuts[p]) {
                sum += GAUSS.legendre(NODES, cuts[p], cuts[p + 1]).integrate(f::applyAsDouble);
            }
        }
        return sum;
    }
}
