package dev.runoff.engine.planning;

import dev.runoff.engine.core.Checks;
import java.util.Arrays;
import java.util.Objects;
import java.util.function.DoubleUnaryOperator;
import org.apache.commons.math3.analysis.solvers.BrentSolver;

/**
 * Optimal, beta-optimal and uniform allocations for identifying the best arm, with their characteristic
 * times.
 *
 * <p>Design (Garivier &amp; Kaufmann 2016, "Optimal Best Arm Identification with Fixed Confidence", COLT,
 * section 2.2, Lemma 3 and Theorem 5). Write 1 for the best arm and, for each other arm a,
 * {@code g_a(x) = inf_m [d(mu_1, m) + x d(mu_a, m)]}, the pairwise cost with weights (1, x). g_a increases
 * from 0 to {@code d(mu_1, mu_a)}; let {@code x_a(y)} be its inverse. At the optimum all pairwise costs are
 * equal to {@code w_1 y*}, so {@code w*_a = x_a(y*) / sum_b x_b(y*)} (with {@code x_1 = 1}) and
 * {@code T*(mu) = sum_b x_b(y*) / y*}, where y* is the unique root in {@code (0, min_a d(mu_1, mu_a))} of
 * {@code F(y) = sum_{a != 1} d(mu_1, m_a(y)) / d(mu_a, m_a(y)) = 1}, {@code m_a(y)} being the minimising m
 * for {@code x = x_a(y)}. The derivation only uses that g_a is an infimum over m of a sum of per-arm
 * divergences (envelope theorem), so it applies unchanged to Gaussian arms with different known variances,
 * where m is the precision-weighted mean.
 *
 * <p>Beta-optimal weights (Russo 2020, "Simple Bayesian Algorithms for Best-Arm Identification", Operations
 * Research): the best arm's weight is fixed at beta and the others equalise the pairwise costs, so
 * {@code w_a = beta x_a(y)} with y solving {@code sum_{a != 1} x_a(y) = (1 - beta) / beta}, and
 * {@code T_beta = 1 / (beta y)}.
 *
 * <p>Both nested equations are solved with Commons Math's {@link BrentSolver}; every function involved is
 * increasing, and brackets are found by doubling, so no starting guess is needed.
 */
public final class OptimalAllocation {
    private static final int MAX_EVALUATIONS = 500;
    private static final double RELATIVE_ACCURACY = 1e-15;
    private static final int MAX_DOUBLINGS = 200;
    private static final int MAX_HALVINGS = 200;

    private OptimalAllocation() {
    }

    /** The optimal weights w*(mu) and characteristic time T*(mu). */
    public static TargetAllocation optimal(ArmModel model) {
        Objects.requireNonNull(model, "model");
        double y = solveIncreasing(v -> ratioSum(model, v), 1.0, maxCost(model));
        double[] x = ratios(model, y);
        double sum = sum(x);
        return new TargetAllocation(TargetAllocation.Kind.OPTIMAL, model.best(), scale(x, 1 / sum), sum / y);
    }

    /**
     * Beta-optimal weights: {@code beta} on the best arm, the rest equalising the pairwise costs.
     *
     * @param beta weight of the best arm, in (0, 1)
     */
    public static TargetAllocation betaOptimal(ArmModel model, double beta) {
        Objects.requireNonNull(model, "model");
        Checks.inOpenRange("beta", beta, 0, 1);
        double y = solveIncreasing(v -> sum(ratios(model, v)) - 1, (1 - beta) / beta, maxCost(model));
        double[] w = scale(ratios(model, y), beta);
        return new TargetAllocation(TargetAllocation.Kind.BETA_OPTIMAL, model.best(), w, 1 / (beta * y));
    }

    /** Equal weights 1/K and their characteristic time. */
    public static TargetAllocation uniform(ArmModel model) {
        Objects.requireNonNull(model, "model");
        double[] w = new double[model.size()];
        Arrays.fill(w, 1.0 / model.size());
        return new TargetAllocation(TargetAllocation.Kind.UNIFORM, model.best(), w, model.characteristicTime(w));
    }

    /** {@code F(y)}: sum over suboptimal arms of {@code d(mu_1, m_a) / d(mu_a, m_a)} at {@code x_a(y)}. */
    private static double ratioSum(ArmModel model, double y) {
        double f = 0;
        for (int a = 0; a < model.size(); a++) {
            if (a != model.best()) {
                double m = model.pairMean(a, inverseG(model, a, y));
                f += model.divergence(model.best(), m) / model.divergence(a, m);
            }
        }
        return f;
    }

    /** {@code x_a(y)} for every arm, with 1 for the best arm. */
    private static double[] ratios(ArmModel model, double y) {
        double[] x = new double[model.size()];
        for (int a = 0; a < x.length; a++) {
            x[a] = a == model.best() ? 1.0 : inverseG(model, a, y);
        }
        return x;
    }

    /** Solves {@code g_a(x) = y} for x, where {@code g_a(x) = pairCost(1, a, x)} increases from 0. */
    private static double inverseG(ArmModel model, int a, double y) {
        DoubleUnaryOperator g = x -> model.pairCost(1, a, x) - y;
        double hi = 1;
        int steps = 0;
        while (g.applyAsDouble(hi) < 0) {
            hi *= 2;
            if (++steps > MAX_DOUBLINGS) {
                throw new IllegalStateException("no bracket for x_" + a + "(" + y + ") in " + model);
            }
        }
        return solve(g, 0, hi);
    }

    /**
     * Root in {@code (0, yMax)} of an increasing {@code f(y) = target}, where f tends to infinity at yMax.
     * The upper end of the bracket approaches yMax by halving the gap, never evaluating f at yMax itself.
     */
    private static double solveIncreasing(DoubleUnaryOperator f, double target, double yMax) {
        DoubleUnaryOperator h = y -> f.applyAsDouble(y) - target;
        double gap = yMax / 2;
        int steps = 0;
        while (h.applyAsDouble(yMax - gap) < 0) {
            gap /= 2;
            if (++steps > MAX_HALVINGS || yMax - gap == yMax) {
                throw new IllegalStateException("no bracket below " + yMax + " for target " + target);
            }
        }
        return solve(h, 0, yMax - gap);
    }

    private static double solve(DoubleUnaryOperator f, double lo, double hi) {
        BrentSolver solver = new BrentSolver(RELATIVE_ACCURACY, hi * RELATIVE_ACCURACY);
        return solver.solve(MAX_EVALUATIONS, f::applyAsDouble, lo, hi);
    }

    /** {@code min_a d(mu_1, mu_a)}: the supremum of the closest challenger's g_a, an upper bound on y*. */
    private static double maxCost(ArmModel model) {
        double min = Double.POSITIVE_INFINITY;
        for (int a = 0; a < model.size(); a++) {
            if (a != model.best()) {
                min = Math.min(min, model.divergence(model.best(), model.mean(a)));
            }
        }
        return min;
    }

    private static double sum(double[] x) {
        double s = 0;
        for (double v : x) {
            s += v;
        }
        return s;
    }

    private static double[] scale(double[] x, double factor) {
        double[] out = new double[x.length];
        for (int i = 0; i < x.length; i++) {
            out[i] = x[i] * factor;
        }
        return out;
    }
}
