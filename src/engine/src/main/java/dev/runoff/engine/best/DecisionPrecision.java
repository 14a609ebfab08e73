package dev.runoff.engine.best;

import java.util.Objects;
import java.util.function.Supplier;

/**
 * The draw policy of engine version 1.3: draws are spent until the quantities the evaluation reads from the
 * alphas are precise enough, and no further.
 *
 * <p><b>Who reads the Monte Carlo alphas.</b> The allocation rule: top-two Thompson sampling and its adaptive
 * form read every alpha and vary smoothly with them; top-two probability sampling reads which arms lead and
 * come second; the value, expected-improvement and uniform rules read none. The stopping rules: the posterior
 * rule compares the Wilson lower bound of the leader's alpha with {@code 1 - delta}; the indifference rule takes
 * the leader by alpha (its probability is integrated exactly); a spent budget or deadline names the leader by
 * alpha; GLR, mixture and sequential-t read no alpha. Guardrails without a control arm take the leader by
 * alpha as their reference. The decision record holds the alphas with their standard errors, which the audit's
 * cross-check holds them to; that needs no more draws, only honest standard errors.
 *
 * <p><b>When drawing stops.</b> After each stage (a first stage of {@value #FIRST_STAGE} draws, then doubling
 * up to the cap, as in {@link AdaptiveMonteCarlo}), with {@code p} the arms' shares of the {@code M} draws,
 * every condition below must hold:
 * <ol>
 *   <li>The leader is ordered against the runner-up at {@value #Z} standard errors of the difference of their
 *       shares, or that standard error is at most {@value #TIE}: the two are then within a few percent of each
 *       other and either may lead (the rule's weights hardly differ; the posterior rule cannot fire on two such
 *       arms; the indifference rule, which can, accepts any arm within its epsilon; a guardrail reference or a
 *       budget winner between near-equals is a coin flip under 1.2 too). With {@link AlphaReaders#orderedRanks()} 2 the
 *       runner-up is ordered against the third arm likewise.</li>
 *   <li>When the rule's weights read the alphas smoothly ({@link AlphaReaders#weights()}), the standard error of
 *       every weight is at most {@value #WEIGHT_ERROR}. It is taken by the delta method (common practice): the
 *       shares are multinomial with covariance {@code (diag(p) - p p^T) / M}, so for weight i with gradient
 *       {@code g} over the shares, {@code Var w_i = (sum_j g_j^2 p_j - (sum_j g_j p_j)^2) / M}. The gradient is
 *       a forward difference with step {@value #STEP}, over the arms that won draws (an arm that won none
 *       contributes no variance: its alpha is integrated, not counted). The weights are evaluated where the
 *       estimator would put them if it stopped now, the arms that won no draw at their integrated alphas: a
 *       challenger that won one or two draws shares the challengers' weight with them, and against 0 that
 *       share would look certain. (Measured on the pool of {@code RecomputeBench}, 2,000 experiments: with
 *       those arms at 0 the largest error of a rule weight against the weights of the exact alphas was 0.22,
 *       against 0.30 for 1.2; see src/docs/performance.md for this policy's figures.) The integration is the
 *       one the estimate needs anyway and is not repeated when no arm wins a first draw later. The weights
 *       are the rule's, before the guards, which only mix them with fixed shares or cap their changes.</li>
 *   <li>When a stopping threshold reads the leader's alpha ({@link AlphaReaders#threshold()}), the leader's
 *       share is clearly on one side of it ({@link LeaderThreshold#decided}).</li>
 * </ol>
 * A question the evaluation does not ask costs no draws: with the GLR rule and top-two Thompson sampling, a
 * clear leader, and challengers whose weights are already known to {@value #WEIGHT_ERROR}, the first stage is
 * all. Engine 1.2 ({@link LeaderOrder}) always drew at least 10,000 and ordered the leader to a resolution of
 * 0.0025 whether or not anything read the order.
 *
 * <p>The result after a stage does not depend on the cap (as in 1.2), so re-running with the recorded draws as
 * the cap reproduces a decision bit for bit.
 */
public final class DecisionPrecision implements DrawPolicy {

    /** Joint draws of the first stage. */
    public static final int FIRST_STAGE = 1_000;
    /** Standard errors of a rank difference that count as ordered. */
    public static final double Z = 3.0;
    /** Standard error of a rank difference below which the two arms count as tied. */
    public static final double TIE = 0.01;
    /** Largest standard error of a rule weight. */
    public static final double WEIGHT_ERROR = 0.01;
    /** Step of the forward difference of the weights over one arm's share. */
    static final double STEP = 1e-7;

    private final AlphaReaders readers;

    /** The policy for an evaluation that reads the alphas as {@code readers} says. */
    public DecisionPrecision(AlphaReaders readers) {
        this.readers = Objects.requireNonNull(readers, "readers");
    }

    @Override
    public int firstStage() {
        return FIRST_STAGE;
    }

    @Override
    public boolean settled(long[] wins, int draws, Supplier<double[]> integrated) {
        for (int rank = 0; rank < Math.min(readers.orderedRanks(), wins.length - 1); rank++) {
            if (!DrawPolicy.ordered(wins, draws, rank, Z, TIE)) {
                return false;
            }
        }
        if (readers.weights() != null && largestWeightError(wins, draws, integrated) > WEIGHT_ERROR) {
            return false;
        }
        LeaderThreshold threshold = readers.threshold();
        return threshold == null || threshold.decided((double) wins[Ranking.leader(wins)] / draws, draws);
    }

    /**
     * The largest delta-method standard error of a rule weight at the alphas the estimator would give now: the
     * shares of the arms that won draws, the integrated alphas of the others. When one arm won every draw the
     * error is 0 whatever the others' alphas, and they are not integrated here.
     */
    double largestWeightError(long[] wins, int draws, Supplier<double[]> integrated) {
        int k = wins.length;
        int winners = 0;
        for (long w : wins) {
            winners += w > 0 ? 1 : 0;
        }
        if (winners < 2) {
            return 0;
        }
        double[] p = winners < k ? integrated.get() : new double[k];
        for (int j = 0; j < k; j++) {
            p[j] = wins[j] > 0 ? (double) wins[j] / draws : p[j];
        }
        double[] w = readers.weights().apply(p.clone());
        double[] first = new double[k];
        double[] second = new double[k];
        for (int j = 0; j < k; j++) {
            if (wins[j] == 0) {
                continue;
            }
            double[] q = p.clone();
            q[j] += STEP;
            double[] moved = readers.weights().apply(q);
            for (int i = 0; i < k; i++) {
                double g = (moved[i] - w[i]) / STEP;
                first[i] += g * p[j];
                second[i] += g * g * p[j];
            }
        }
        double largest = 0;
        for (int i = 0; i < k; i++) {
            largest = Math.max(largest, Math.max(0, second[i] - first[i] * first[i]) / draws);
        }
        return Math.sqrt(largest);
    }

    @Override
    public String toString() {
        return "DecisionPrecision[" + readers + "]";
    }
}
