package dev.runoff.engine.best;

import dev.runoff.engine.Checks;
import dev.runoff.engine.posterior.Posterior;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;

/**
 * The probability that each arm is best by one-dimensional numerical integration:
 * <pre>
 *   alpha_i = P(theta_i > max_{j != i} theta_j) = integral f_i(x) prod_{j != i} F_j(x) dx
 * </pre>
 * for independent posteriors (the standard order-statistics identity; e.g. Miller 2015, "Formulas for
 * Bayesian A/B Testing", for the two-arm case). Deterministic: the seed is ignored, standard errors are 0.
 *
 * <p>Design: each arm's range runs from where {@code log F = -60} to where {@code log S = -60} (solved in
 * log space); every integral starts at the largest lower end (left of it some {@code F_j < e^-60}, so every
 * term is below {@code e^-60}) and arm i's integral stops at its own upper end. The truncation error is
 * therefore below about {@code 2e-26} per alpha, i.e. relative error below {@code 1e-13} for alphas down to
 * {@code 1e-12}; alphas far below {@code 1e-20} are returned with that absolute accuracy only (possibly 0).
 * The quadrature is {@link ExactIntegrator}. The alphas are not normalised: their sum differs from 1 only
 * by the integration error.
 */
public final class ExactProbabilityBest implements ProbabilityBestEstimator {
    /** Log-probability that defines each arm's range. */
    static final double LOG_TAIL = -60;
    private static final int JOINT_STEPS = 4;
    private static final double JOINT_TOLERANCE = 1.0;

    /** Creates the (stateless) estimator. */
    public ExactProbabilityBest() {
        // stateless
    }

    @Override
    public ProbabilityBest estimate(List<? extends Posterior> posteriors, long seed) {
        List<ExactArm> arms = arms(posteriors, -1, 0);
        boolean[] all = new boolean[arms.size()];
        Arrays.fill(all, true);
        double[] alpha = alphas(arms, all);
        return new ProbabilityBest(alpha, new double[alpha.length], ProbabilityBest.Method.EXACT, 0);
    }

    /**
     * {@code P(theta_leader >= max_{j != leader} theta_j - epsilon) = integral f_L(x) prod_{j != L}
     * F_j(x + epsilon) dx}, the posterior probability that the leader is within {@code epsilon} of the best
     * (the indifference-zone stopping statistic).
     *
     * @param posteriors at least two independent posteriors
     * @param leader     index of the arm in question
     * @param epsilon    the indifference margin, finite and {@code >= 0}
     */
    public static double probabilityWithin(List<? extends Posterior> posteriors, int leader, double epsilon) {
        Checks.nonNegative("epsilon", epsilon);
        List<ExactArm> arms = arms(posteriors, leader, epsilon);
        boolean[] only = new boolean[arms.size()];
        only[leader] = true;
        return alphas(arms, only)[leader];
    }

    private static double[] alphas(List<ExactArm> arms, boolean[] which) {
        int n = arms.size();
        double start = jointLower(arms);
        double[] from = new double[n];
        double[] to = new double[n];
        for (int i = 0; i < n; i++) {
            from[i] = start;
            to[i] = arms.get(i).upper();
        }
        return ExactIntegrator.integrate(arms, from, to, ExactIntegrator.Own.DENSITY, which);
    }

    /**
     * A point {@code x} with {@code P(max_j theta_j <= x) = prod_j F_j(x) <= e^LOG_TAIL}: left of it every
     * integrand {@code f_i prod_{j != i} F_j} integrates to at most {@code prod_j F_j(x)}, since the
     * {@code F_j} increase. Starts from the largest single-arm lower end (where one factor alone is small
     * enough) and moves right by a few Newton steps on {@code sum_j log F_j(x) = LOG_TAIL}, keeping only
     * points that still satisfy the bound; with many similar arms this trims several standard deviations.
     */
    private static double jointLower(List<ExactArm> arms) {
        double x = Double.NEGATIVE_INFINITY;
        for (ExactArm arm : arms) {
            x = Math.max(x, arm.lower());
        }
        for (int step = 0; step < JOINT_STEPS; step++) {
            double logP = 0;
            double slope = 0;
            for (ExactArm arm : arms) {
                double logF = arm.logCdf(x);
                logP += logF;
                slope += StrictMath.exp(arm.logDensity(x) - logF);
            }
            double next = x + (LOG_TAIL - logP) / slope;
            if (!(logP < LOG_TAIL - JOINT_TOLERANCE) || !(next > x) || !Double.isFinite(next)) {
                break;
            }
            double logNext = 0;
            for (ExactArm arm : arms) {
                logNext += arm.logCdf(next);
            }
            if (!(logNext <= LOG_TAIL)) {
                break;
            }
            x = next;
        }
        return x;
    }

    /**
     * Validated arms; every arm except {@code leader} is shifted down by {@code epsilon} (with
     * {@code leader = -1} nothing is shifted).
     */
    private static List<ExactArm> arms(List<? extends Posterior> posteriors, int leader, double epsilon) {
        checkPosteriors(posteriors);
        if (leader != -1 && (leader < 0 || leader >= posteriors.size())) {
            throw new IllegalArgumentException("leader must be an arm index in [0, " + (posteriors.size() - 1)
                    + "], got " + leader);
        }
        List<ExactArm> arms = new ArrayList<>(posteriors.size());
        for (int i = 0; i < posteriors.size(); i++) {
            double shift = leader == -1 || i == leader ? 0 : epsilon;
            arms.add(new ExactArm(posteriors.get(i), shift, LOG_TAIL));
        }
        return arms;
    }

    /** Throws unless there are at least two posteriors, none null. */
    static void checkPosteriors(List<? extends Posterior> posteriors) {
        if (posteriors == null) {
            throw new IllegalArgumentException("posteriors must not be null");
        }
        if (posteriors.size() < 2) {
            throw new IllegalArgumentException("posteriors must hold at least two arms, got " + posteriors.size());
        }
        for (int i = 0; i < posteriors.size(); i++) {
            if (posteriors.get(i) == null) {
                throw new IllegalArgumentException("posterior of arm " + i + " must not be null");
            }
        }
    }
}
