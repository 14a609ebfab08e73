package dev.runoff.engine.best;

import dev.runoff.engine.posterior.BetaPosterior;
import dev.runoff.engine.posterior.Posterior;
import java.util.Arrays;
import java.util.List;

/**
 * The arms engine version 1.5 leaves out of the Monte Carlo draws: those that, with every posterior a Beta,
 * cannot win a single draw except with negligible probability. Such an arm gets no sampler (no table) and no
 * draws; it wins nothing and its alpha is its zero-win integral, as for any arm that wins no draw.
 *
 * <p>Design. Let {@code L} be the arm with the highest posterior mean (the lowest index among equals). Arm
 * {@code j} wins a joint draw only if {@code X_j > X_L}, and for any {@code c}, {@code {X_j > X_L}} lies in
 * {@code {X_j > c} or {X_L <= c}}, so by the union bound (Boole's inequality)
 * <pre>
 *   P(X_j > X_L) <= S_j(c) + F_L(c)
 * </pre>
 * with {@code S_j} the survival function of arm j's Beta and {@code F_L} the distribution function of the
 * leader's; the bound holds for every {@code c}, which only decides how tight it is. {@code c} is taken where
 * the two arms are equally many standard deviations away, {@code c = (m_j s_L + m_L s_j) / (s_j + s_L)}, between
 * the two means. Over at most {@code M} joint draws (the job's cap) and with {@code k} arms, leaving out every
 * arm whose bound is below {@code 1e-9 / (M (k - 1))} changes the winner of some draw (coupling: the same draws
 * of the other arms, with and without the arms left out) with probability at most {@code 1e-9}, again by the
 * union bound over draws and arms. The bound is at least the arm's exact alpha (an arm that is best beats the
 * leader), so an arm left out has alpha below about {@code 2.5e-14} at the default cap of 40,000 draws.
 *
 * <p>The leader and at least one other arm are always drawn. Posteriors other than Beta (Student-t) are never
 * left out. Which arms are left out depends only on the posteriors and the cap, so the other arms' draws stay a
 * function of the seed and the posteriors, and a record replays bit for bit.
 */
final class CertainLosers {
    /** Largest probability that leaving the arms out changes the winner of any draw. */
    static final double CHANGE = 1e-9;

    private CertainLosers() {
    }

    /**
     * Which arms to draw ({@code true}) for at most {@code maxDraws} joint draws over {@code posteriors}.
     *
     * @throws IllegalArgumentException if {@code maxDraws < 1}
     */
    static boolean[] drawn(List<? extends Posterior> posteriors, int maxDraws) {
        if (maxDraws < 1) {
            throw new IllegalArgumentException("maxDraws must be >= 1, got " + maxDraws);
        }
        int k = posteriors.size();
        boolean[] drawn = new boolean[k];
        Arrays.fill(drawn, true);
        if (!allBeta(posteriors)) {
            return drawn;
        }
        int leader = leader(posteriors);
        double threshold = CHANGE / ((double) maxDraws * (k - 1));
        int kept = k;
        for (int j = 0; j < k && kept > 2; j++) {
            if (j != leader && bound(posteriors.get(j), posteriors.get(leader)) < threshold) {
                drawn[j] = false;
                kept--;
            }
        }
        return drawn;
    }

    /** {@code S_j(c) + F_L(c)} at the point between the two means described in the class comment. */
    static double bound(Posterior arm, Posterior leader) {
        double sArm = Math.sqrt(arm.variance());
        double sLeader = Math.sqrt(leader.variance());
        double c = (arm.mean() * sLeader + leader.mean() * sArm) / (sArm + sLeader);
        return StrictMath.exp(arm.logSurvival(c)) + StrictMath.exp(leader.logCdf(c));
    }

    /** The arm with the highest posterior mean, the lowest index among equals. */
    static int leader(List<? extends Posterior> posteriors) {
        int leader = 0;
        for (int i = 1; i < posteriors.size(); i++) {
            leader = posteriors.get(i).mean() > posteriors.get(leader).mean() ? i : leader;
        }
        return leader;
    }

    private static boolean allBeta(List<? extends Posterior> posteriors) {
        for (Posterior p : posteriors) {
            if (!(p instanceof BetaPosterior)) {
                return false;
            }
        }
        return true;
    }
}
