package dev.runoff.engine.allocation;

import dev.runoff.engine.posterior.Posterior;
import dev.runoff.engine.posterior.StudentTPosterior;
import java.util.List;

/**
 * Top-two Thompson sampling with an adaptive leader share: information-directed selection (You, Qin, Wang
 * &amp; Yang 2023, "Information-Directed Selection for Top-Two Algorithms", COLT, PMLR 195; arXiv 2205.12086).
 * Instead of measuring the leader I with a fixed probability beta, the rule measures it with probability
 * {@code h_IJ} that depends on the pair (leader I, challenger J) drawn by top-two Thompson sampling.
 *
 * <p>Design. For Gaussian arms with a common known variance the paper's selection measures the leader with
 * probability {@code p_J / (p_I + p_J)}, where p are the arms' shares of the trials so far (the formula is
 * written from memory: the stored copies of the paper reached only its abstract). Why it is right: if in the
 * long run arm 1 leads and J challenges in a fraction psi_J of the periods, the shares are
 * {@code w_1 = sum_J psi_J h_J} and {@code w_J = psi_J (1 - h_J)}; with {@code h_J = w_J / (w_1 + w_J)},
 * {@code w_1 = sum_J w_J h_J / (1 - h_J) = sum_J w_J^2 / w_1}, i.e. {@code w_1^2 = sum_J w_J^2}, the condition
 * that the optimal allocation of Garivier &amp; Kaufmann (2016) satisfies for such arms (checked against
 * {@code OptimalAllocation} in the tests). Here {@code p_J / (p_I + p_J)} is written as
 * {@code v_I / (v_I + v_J)} with v the posterior variance of each arm's mean, which is sigma^2 / n for a
 * Gaussian arm, so it is the same rule for equal variances; for unequal variances and for Bernoulli arms
 * (variance of the Beta posterior, about mu (1 - mu) / n) it is the same rule on the arms' local Gaussian
 * approximation, where the paper's optimality proof does not reach. For a Student-t posterior the squared
 * scale stands for v (the variance is infinite below 3 degrees of freedom).
 *
 * <p>Closed form. The arm of a pair {i, j} that gets measured is i with probability
 * {@code s_ij = v_i / (v_i + v_j)} whichever of the two leads, so with the top-two Thompson pair probability
 * {@code pi_ij = alpha_i alpha_j / (1 - alpha_i) + alpha_j alpha_i / (1 - alpha_j)},
 * <pre>
 *   psi_i = sum_{j != i} pi_ij * v_i / (v_i + v_j).
 * </pre>
 * The weights sum to 1 because the pair probabilities do and the two shares of a pair add up to 1. As in
 * {@link TopTwo#thompson}, {@code 1 - alpha} is formed as the sum of the other alphas, and when one arm has
 * alpha exactly 1 it is paired with each other arm with equal probability.
 */
public final class InformationDirected {
    private InformationDirected() {
    }

    /**
     * The weights of top-two Thompson sampling with information-directed selection.
     *
     * @param posteriors each arm's posterior, in arm order
     * @param alpha      probability that each arm is best, in the same order: finite, non-negative, not all 0
     */
    public static double[] weights(List<? extends Posterior> posteriors, double[] alpha) {
        Weights.checkScores("alpha", alpha);
        if (posteriors.size() != alpha.length) {
            throw new IllegalArgumentException("got " + posteriors.size() + " posteriors but " + alpha.length
                    + " alphas");
        }
        double[] v = spreads(posteriors);
        double[][] pairs = pairProbabilities(Weights.normalised(alpha));
        double[] psi = new double[v.length];
        for (int i = 0; i < v.length; i++) {
            for (int j = 0; j < v.length; j++) {
                if (j != i) {
                    psi[i] += pairs[i][j] * (v[i] / (v[i] + v[j]));
                }
            }
        }
        return Weights.normalised(psi);
    }

    /**
     * The share the rule gives arm {@code i} within the pair (i, j): {@code v_i / (v_i + v_j)}.
     *
     * @param posteriors each arm's posterior
     */
    public static double pairShare(List<? extends Posterior> posteriors, int i, int j) {
        double[] v = spreads(posteriors);
        return v[i] / (v[i] + v[j]);
    }

    /** Probability that {i, j} is the top-two Thompson pair, in either order; symmetric, 0 on the diagonal. */
    private static double[][] pairProbabilities(double[] a) {
        int k = a.length;
        double[] others = new double[k];
        for (int j = 0; j < k; j++) {
            for (int i = 0; i < k; i++) {
                others[j] += i == j ? 0 : a[i];
            }
        }
        double[][] pi = new double[k][k];
        for (int i = 0; i < k; i++) {
            if (others[i] == 0) {
                return pairedWithAll(k, i);
            }
        }
        for (int i = 0; i < k; i++) {
            for (int j = 0; j < k; j++) {
                if (j != i) {
                    pi[i][j] = a[i] * (a[j] / others[i]) + a[j] * (a[i] / others[j]);
                }
            }
        }
        return pi;
    }

    /** Arm {@code lead} has alpha 1: it forms each of the k - 1 pairs with equal probability. */
    private static double[][] pairedWithAll(int k, int lead) {
        double[][] pi = new double[k][k];
        for (int j = 0; j < k; j++) {
            if (j != lead) {
                pi[lead][j] = 1.0 / (k - 1);
                pi[j][lead] = 1.0 / (k - 1);
            }
        }
        return pi;
    }

    /** The posterior variance of each arm's mean (squared scale for Student-t), finite and > 0. */
    private static double[] spreads(List<? extends Posterior> posteriors) {
        double[] v = new double[posteriors.size()];
        for (int i = 0; i < v.length; i++) {
            Posterior p = posteriors.get(i);
            v[i] = p instanceof StudentTPosterior t ? t.scale() * t.scale() : p.variance();
            if (!(v[i] > 0) || !Double.isFinite(v[i])) {
                throw new IllegalArgumentException("posterior spread of arm " + i + " must be finite and > 0, got "
                        + v[i]);
            }
        }
        return v;
    }
}
