package dev.runoff.engine.best;

import dev.runoff.engine.core.Checks;
import dev.runoff.engine.posterior.Posterior;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;

/**
 * Expected gains (posterior expected improvements) of independent posteriors, by exact one-dimensional
 * integration in log space.
 *
 * <p>Design: for independent X and Y, {@code E[(X - Y)^+] = integral P(X > t) P(Y < t) dt} (write
 * {@code (X - Y)^+ = integral 1{Y < t < X} dt} and take expectations; Fubini). With several arms,
 * {@code V_i = E[(theta_i - max_{j != i} theta_j)^+] = integral S_i(t) prod_{j != i} F_j(t) dt}, the
 * quantity behind top-two value sampling. Each arm's range is widened until its integrated tails are below
 * {@code e^-60} (heavy Student-t tails need much more room than for probabilities); the integral of arm i
 * starts at the largest lower end among the other arms, since {@code S_i} does not decay to the left.
 * All values need finite posterior means (Student-t with more than one degree of freedom).
 */
public final class ExpectedGain {
    private static final double LOG_TAIL = -60;
    private static final double DEEPEST_LOG_TAIL = -700;

    private ExpectedGain() {
    }

    /**
     * {@code V_i = E[(theta_i - max_{j != i} theta_j)^+]} for every arm.
     *
     * @param posteriors at least two independent posteriors with finite means
     * @return the expected gain of each arm over the best of the others, in order
     */
    public static double[] valueOfBeingBest(List<? extends Posterior> posteriors) {
        ExactProbabilityBest.checkPosteriors(posteriors);
        boolean[] all = new boolean[checked(posteriors).size()];
        Arrays.fill(all, true);
        return values(posteriors, all);
    }

    /**
     * {@code E[(theta_x - theta_y)^+]} for independent posteriors.
     *
     * @param x first posterior, finite mean
     * @param y second posterior, finite mean
     */
    public static double pairwise(Posterior x, Posterior y) {
        List<Posterior> pair = List.of(requireNonNull(x, "posterior x"), requireNonNull(y, "posterior y"));
        return values(checked(pair), new boolean[] {true, false})[0];
    }

    /**
     * {@code E[(theta_x - c)^+] = integral_c^infinity S_x(t) dt}. Below the range of x the integrand is 1 to
     * within {@code e^-60} and that stretch is added as its length; a threshold far in the upper tail gets
     * a range reaching 60 below {@code log S(c)}, so the small result keeps its relative accuracy.
     *
     * @param x posterior with a finite mean
     * @param c the threshold, finite
     */
    public static double overThreshold(Posterior x, double c) {
        Checks.finite("threshold c", c);
        checked(List.of(requireNonNull(x, "posterior x")));
        double logTail = Math.max(DEEPEST_LOG_TAIL, Math.min(LOG_TAIL, x.logSurvival(c) + LOG_TAIL));
        ExactArm arm = new ExactArm(x, 0, logTail, true);
        double below = Math.max(0, arm.lower() - c);
        double from = Math.max(c, arm.lower());
        double to = arm.upper();
        if (!(to > from)) {
            return below;
        }
        double[] integral = ExactIntegrator.integrate(List.of(arm), new double[] {from}, new double[] {to},
                ExactIntegrator.Own.SURVIVAL, new boolean[] {true});
        return below + integral[0];
    }

    private static double[] values(List<? extends Posterior> posteriors, boolean[] which) {
        int n = posteriors.size();
        List<ExactArm> arms = new ArrayList<>(n);
        for (Posterior p : posteriors) {
            arms.add(new ExactArm(p, 0, LOG_TAIL, true));
        }
        double[] from = new double[n];
        double[] to = new double[n];
        for (int i = 0; i < n; i++) {
            double start = Double.NEGATIVE_INFINITY;
            for (int j = 0; j < n; j++) {
                if (j != i) {
                    start = Math.max(start, arms.get(j).lower());
                }
            }
            from[i] = start;
            to[i] = arms.get(i).upper();
        }
        return ExactIntegrator.integrate(arms, from, to, ExactIntegrator.Own.SURVIVAL, which);
    }

    /** Throws unless the posteriors are present and all have finite means. */
    private static <P extends Posterior> List<P> checked(List<P> posteriors) {
        if (posteriors == null) {
            throw new IllegalArgumentException("posteriors must not be null");
        }
        for (int i = 0; i < posteriors.size(); i++) {
            Posterior p = requireNonNull(posteriors.get(i), "posterior of arm " + i);
            if (!Double.isFinite(p.mean())) {
                throw new IllegalArgumentException("expected gain needs a finite posterior mean: arm " + i
                        + " is " + p + " (a Student-t needs more than 1 degree of freedom)");
            }
        }
        return posteriors;
    }

    private static Posterior requireNonNull(Posterior p, String name) {
        if (p == null) {
            throw new IllegalArgumentException(name + " must not be null");
        }
        return p;
    }
}
