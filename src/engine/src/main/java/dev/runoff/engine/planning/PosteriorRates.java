package dev.runoff.engine.planning;

import java.util.Arrays;
import java.util.Objects;

/**
 * The exponential rates at which the posterior rules out each losing arm under a given split of traffic.
 *
 * <p>Design (Russo 2020, "Simple Bayesian Algorithms for Best-Arm Identification", Operations Research 68(6),
 * section on the optimal rates of posterior convergence; section numbers from memory). When a fraction
 * {@code w_a} of n trials goes to each arm, the posterior probability that a losing arm i is best decays as
 * {@code exp(-n C_i(w))}, with {@code C_i(w) = min_x [w_best d(mu_best, x) + w_i d(mu_i, x)]} (d the KL
 * divergence of the arms' family): the pairwise cost of {@link ArmModel#pairwiseCost}, the same quantity
 * whose minimum over i is {@code 1 / T_w} in Garivier &amp; Kaufmann 2016, Theorem 1 (both papers count the
 * n trials of all arms together and weights that sum to 1, so no factor separates the two). The probability
 * that the best arm is not best decays at {@code min_i C_i(w)}. With the best arm's share fixed at beta,
 * the largest such rate is {@code Gamma*_beta = max_{w: w_best = beta} min_{i != best} C_i(w)}; it is
 * reached where every C_i is equal (the beta-optimal allocation of {@link OptimalAllocation#betaOptimal}),
 * and top-two sampling with parameter beta attains it (Russo 2020, Theorem 2 for Thompson sampling's top-two
 * variant, from memory). The uniform split's rate is {@code min_i C_i(1/K, ..., 1/K)}.
 */
public final class PosteriorRates {

    private PosteriorRates() {
    }

    /**
     * {@code Gamma*_beta}: the smallest pairwise rate at the beta-optimal weights, evaluated from the
     * pairwise costs at those weights (not from the solver's characteristic time).
     *
     * @param model arms with a unique best ({@link ArmModel#best()} throws otherwise)
     * @param beta  the best arm's share, in (0, 1)
     */
    public static double betaOptimal(ArmModel model, double beta) {
        Objects.requireNonNull(model, "model");
        return smallest(model, OptimalAllocation.betaOptimal(model, beta).weights());
    }

    /** The rate of the uniform split: the smallest pairwise rate at weights 1/K. */
    public static double uniform(ArmModel model) {
        Objects.requireNonNull(model, "model");
        double[] w = new double[model.size()];
        Arrays.fill(w, 1.0 / model.size());
        return smallest(model, w);
    }

    /**
     * {@code C_i(w)} for every arm, NaN for the best arm.
     *
     * @param model   arms with a unique best
     * @param weights one non-negative weight per arm
     */
    public static double[] perArm(ArmModel model, double[] weights) {
        Objects.requireNonNull(model, "model");
        int best = model.best();
        double[] rates = new double[model.size()];
        for (int a = 0; a < rates.length; a++) {
            rates[a] = a == best ? Double.NaN : model.pairwiseCost(weights, a);
        }
        return rates;
    }

    private static double smallest(ArmModel model, double[] weights) {
        double min = Double.POSITIVE_INFINITY;
        for (double rate : perArm(model, weights)) {
            min = Double.isNaN(rate) ? min : Math.min(min, rate);
        }
        return min;
    }
}
