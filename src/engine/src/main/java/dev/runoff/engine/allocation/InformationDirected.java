package dev.runoff.engine.allocation;

import dev.runoff.engine.posterior.BetaPosterior;
import dev.runoff.engine.posterior.Posterior;
import dev.runoff.engine.posterior.StudentTPosterior;
import dev.runoff.engine.stopping.Divergence;
import java.util.List;

/**
 * Top-two Thompson sampling with an adaptive leader share: information-directed selection (You, Qin, Wang
 * &amp; Yang 2023, "Information-Directed Selection for Top-Two Algorithms", COLT, PMLR 195; arXiv 2205.12086).
 * Instead of measuring the leader I with a fixed probability beta, the rule measures it with a probability
 * {@code h_IJ} that depends on the pair (leader I, challenger J) drawn by top-two Thompson sampling.
 *
 * <p>Source. The stored copies of the paper reached only its abstract. The selection is read from the
 * authors' public code (github.com/zihaophys/topk_colt23, {@code algorithm.jl}, the step "toss a biased
 * optimized coin"): with p the arms' shares of the trials so far, d the KL divergence of the arms' family and
 * {@code m = (p_I mu_I + p_J mu_J) / (p_I + p_J)}, measure I with probability
 * {@code p_I d(mu_I, m) / (p_I d(mu_I, m) + p_J d(mu_J, m))}, i.e. each arm's part of the pair's GLR cost.
 *
 * <p>Design. Rate arms (Beta posteriors) use exactly that coin, with the posterior means for mu and the
 * posterior counts {@code a + b} (trials plus the prior's pseudo-counts) for p. For Gaussian arms the coin
 * reduces, with the precision-weighted m of unequal known variances, to {@code v_I / (v_I + v_J)}, v being
 * sigma^2 / n, the variance of each arm's mean; value arms (Student-t posteriors) use that form with the
 * squared scale for v (the variance is infinite below 3 degrees of freedom). With one common variance it is
 * {@code p_J / (p_I + p_J)}. Why it is right there: if in the long run arm 1 leads and J challenges in a
 * fraction psi_J of the periods, the shares are {@code w_1 = sum_J psi_J h_J} and
 * {@code w_J = psi_J (1 - h_J)}; with {@code h_J = w_J / (w_1 + w_J)},
 * {@code w_1 = sum_J w_J h_J / (1 - h_J) = sum_J w_J^2 / w_1}, i.e. {@code w_1^2 = sum_J w_J^2}, the condition
 * that the optimal allocation of Garivier &amp; Kaufmann (2016) satisfies for such arms (checked against
 * {@code OptimalAllocation} in the tests). The paper's optimality proof covers Gaussian arms only. When the
 * two means are equal the coin is 0/0; its limit, {@code p_J / (p_I + p_J)}, is used.
 *
 * <p>Closed form. The coin gives arm i of a pair {i, j} the same share {@code s_ij} whichever of the two
 * leads, and {@code s_ij + s_ji = 1}, so with the top-two Thompson pair probability
 * {@code pi_ij = alpha_i alpha_j / (1 - alpha_i) + alpha_j alpha_i / (1 - alpha_j)},
 * <pre>
 *   psi_i = sum_{j != i} pi_ij * s_ij.
 * </pre>
 * The weights sum to 1 because the pair probabilities do. As in {@link TopTwo#thompson}, {@code 1 - alpha}
 * is formed as the sum of the other alphas, and when one arm has alpha exactly 1 it is paired with each
 * other arm with equal probability.
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
        double[][] pairs = pairProbabilities(Weights.normalised(alpha));
        double[] psi = new double[alpha.length];
        for (int i = 0; i < psi.length; i++) {
            for (int j = 0; j < psi.length; j++) {
                if (j != i) {
                    psi[i] += pairs[i][j] * pairShare(posteriors.get(i), posteriors.get(j));
                }
            }
        }
        return Weights.normalised(psi);
    }

    /**
     * The probability that the rule measures arm x of the pair {x, y}, whichever of the two leads.
     *
     * @param x one arm's posterior
     * @param y the other arm's posterior
     */
    public static double pairShare(Posterior x, Posterior y) {
        if (x instanceof BetaPosterior bx && y instanceof BetaPosterior by) {
            return bernoulliShare(bx, by);
        }
        double vx = spread(x);
        double vy = spread(y);
        return vx / (vx + vy);
    }

    /** The authors' coin for rate arms: x's part of the pair's Bernoulli GLR cost. */
    private static double bernoulliShare(BetaPosterior x, BetaPosterior y) {
        double nx = x.a() + x.b();
        double ny = y.a() + y.b();
        double m = Divergence.bernoulliPairMean(x.mean(), nx, y.mean(), ny);
        double cx = nx * Divergence.bernoulli(x.mean(), m);
        double cy = ny * Divergence.bernoulli(y.mean(), m);
        return cx > 0 && cy > 0 ? cx / (cx + cy) : ny / (nx + ny);
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

    /** The variance of an arm's mean (squared scale for Student-t), finite and > 0. */
    private static double spread(Posterior p) {
        double v = p instanceof StudentTPosterior t ? t.scale() * t.scale() : p.variance();
        if (!(v > 0) || !Double.isFinite(v)) {
            throw new IllegalArgumentException("posterior spread must be finite and > 0, got " + v + " for " + p);
        }
        return v;
    }
}
