package dev.runoff.engine.allocation;

import dev.runoff.engine.core.Checks;
import dev.runoff.engine.best.ExpectedGain;
import dev.runoff.engine.posterior.Posterior;
import java.util.List;

/**
 * Top-two allocation rules as pure functions. Each returns non-negative weights, in arm order, that sum
 * to 1. Where a rule picks a leader and a challenger by a score, ties go to the lowest arm index (so equal
 * posteriors put {@code beta} on arm 0 and {@code 1 - beta} on arm 1).
 *
 * <p>The rules follow Russo (2020), "Simple Bayesian algorithms for best-arm identification", Operations
 * Research 68(6): the leader is measured with probability {@code beta}, otherwise a challenger. Top-two
 * expected improvement follows Qin, Klabjan and Russo (2017), "Improving the expected improvement
 * algorithm", NeurIPS.
 */
public final class TopTwo {
    private TopTwo() {
    }

    /**
     * Top-two Thompson sampling in closed form: the exact probability that the randomised rule (draw from
     * the posterior, take the argmax as leader; with probability {@code beta} measure it, otherwise redraw
     * until another arm is the argmax and measure that one) measures arm i,
     * <pre>
     *   psi_i = alpha_i * (beta + (1 - beta) * sum_{j != i} alpha_j / (1 - alpha_j)).
     * </pre>
     *
     * <p>Design: {@code alpha} is first divided by its sum; {@code 1 - alpha_j} is then formed as the sum
     * of the other alphas, never by subtraction, so a leader with alpha near 1 keeps its challengers'
     * tiny shares exact. Each term is evaluated as {@code alpha_j * (alpha_i / (1 - alpha_j))}, where the
     * ratio is at most 1, so nothing overflows. The randomised rule is undefined when one arm has alpha
     * exactly 1 (no redraw ever makes another arm the argmax); then the leader gets {@code beta} and the
     * challenger share {@code 1 - beta} goes to the other arms in proportion to their alphas, or equally
     * when those are all 0. This is the limit of the formula as the other alphas shrink in fixed ratios.
     *
     * @param alpha probability that each arm is best: finite, non-negative, not all 0
     * @param beta  probability of measuring the leader, in [0, 1]
     */
    public static double[] thompson(double[] alpha, double beta) {
        checkBeta(beta);
        Weights.checkScores("alpha", alpha);
        double[] a = Weights.normalised(alpha);
        double[] othersSum = sumsOfOthers(a);
        for (int j = 0; j < a.length; j++) {
            if (othersSum[j] == 0) {
                return degenerateThompson(a, j, beta);
            }
        }
        double[] psi = new double[a.length];
        for (int i = 0; i < a.length; i++) {
            double challenged = 0;
            for (int j = 0; j < a.length; j++) {
                if (j != i) {
                    challenged += a[j] * (a[i] / othersSum[j]);
                }
            }
            psi[i] = beta * a[i] + (1 - beta) * challenged;
        }
        return Weights.normalised(psi);
    }

    /** For each j, the sum of all entries but j, added up term by term. */
    private static double[] sumsOfOthers(double[] a) {
        double[] s = new double[a.length];
        for (int j = 0; j < a.length; j++) {
            for (int i = 0; i < a.length; i++) {
                if (i != j) {
                    s[j] += a[i];
                }
            }
        }
        return s;
    }

    /** Leader {@code lead} has alpha 1: it gets beta; the others split 1 - beta equally (their alphas are 0). */
    private static double[] degenerateThompson(double[] a, int lead, double beta) {
        double[] w = new double[a.length];
        for (int i = 0; i < a.length; i++) {
            w[i] = i == lead ? beta : (1 - beta) / (a.length - 1);
        }
        return w;
    }

    /**
     * Top-two probability sampling: {@code beta} on the arm with the largest alpha, {@code 1 - beta} on
     * the runner-up.
     *
     * @param alpha probability that each arm is best
     * @param beta  share of the leader, in [0, 1]
     */
    public static double[] probability(double[] alpha, double beta) {
        checkBeta(beta);
        Weights.checkScores("alpha", alpha);
        return byScore(alpha, beta);
    }

    /**
     * Top-two value sampling: {@code beta} on the arm with the largest value of being best
     * {@code V_i = E[(theta_i - max_{j != i} theta_j)^+]}, {@code 1 - beta} on the runner-up by V.
     *
     * @param posteriors at least two independent posteriors with finite means
     * @param beta       share of the leader, in [0, 1]
     */
    public static double[] value(List<? extends Posterior> posteriors, double beta) {
        checkBeta(beta);
        double[] v = ExpectedGain.valueOfBeingBest(posteriors);
        Weights.checkScores("value of being best", v);
        return byScore(v, beta);
    }

    /**
     * Top-two expected improvement (Qin, Klabjan and Russo 2017): the leader maximises the classic expected
     * improvement {@code v_i = E[(theta_i - max_j mu_j)^+]} over the best posterior mean of <em>all</em>
     * arms, the arm itself included (the classic EI of Jones et al. 1998 over the current best, as the paper
     * uses it; not over the best <em>other</em> arm; section number not checked: the stored copies of the
     * paper reached only its abstract and reviews, so this follows the reading and memory); the
     * challenger
     * maximises {@code E[(theta_j - theta_leader)^+]} over {@code j != leader}. The leader gets
     * {@code beta}, the challenger {@code 1 - beta}.
     *
     * @param posteriors at least two independent posteriors with finite means
     * @param beta       share of the leader, in [0, 1]
     */
    public static double[] expectedImprovement(List<? extends Posterior> posteriors, double beta) {
        checkBeta(beta);
        int k = posteriors.size();
        if (k < 2) {
            throw new IllegalArgumentException("expected improvement needs at least two arms, got " + k);
        }
        double[] mu = new double[k];
        for (int i = 0; i < k; i++) {
            mu[i] = Checks.finite("posterior mean of arm " + i, posteriors.get(i).mean());
        }
        double best = mu[Weights.argmax(mu)];
        double[] improvement = new double[k];
        for (int i = 0; i < k; i++) {
            improvement[i] = ExpectedGain.overThreshold(posteriors.get(i), best);
        }
        int leader = Weights.argmax(improvement);
        double[] overLeader = new double[k];
        for (int j = 0; j < k; j++) {
            overLeader[j] = j == leader ? 0 : ExpectedGain.pairwise(posteriors.get(j), posteriors.get(leader));
        }
        return leaderAndChallenger(k, leader, Weights.argmaxExcept(overLeader, leader), beta);
    }

    /**
     * Equal weights {@code 1 / k}.
     *
     * @param k number of arms, at least 1
     */
    public static double[] uniform(int k) {
        if (k < 1) {
            throw new IllegalArgumentException("number of arms must be >= 1, got " + k);
        }
        return Weights.uniform(k);
    }

    private static double[] byScore(double[] score, double beta) {
        int leader = Weights.argmax(score);
        return leaderAndChallenger(score.length, leader, Weights.argmaxExcept(score, leader), beta);
    }

    private static double[] leaderAndChallenger(int k, int leader, int challenger, double beta) {
        double[] w = new double[k];
        w[leader] = beta;
        w[challenger] = 1 - beta;
        return w;
    }

    private static void checkBeta(double beta) {
        Checks.inClosedRange("beta", beta, 0, 1);
    }
}
