package dev.runoff.engine.best;

import dev.runoff.engine.core.Checks;
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
 * Bayesian A/B Testing", for two arms). Deterministic: the seed is ignored, standard errors are 0.
 *
 * <p>Design:
 * <ul>
 *   <li>Range: each arm's range runs from where {@code log F = K} to where {@code log S = K} (solved in log
 *       space), first with {@code K = -60}. All integrals start at a point {@code x0} with
 *       {@code prod_j F_j(x0) <= e^K} and arm i's integral stops at its own upper end, so the truncation
 *       error of each alpha is below {@code 2 e^K} (left of {@code x0} the integrand of arm i integrates to
 *       at most {@code prod_j F_j(x0)}; right of the upper end to at most {@code S_i = e^K}).</li>
 *   <li>Tiny alphas: while some alpha is not at least {@code e^30} times that bound, the integrals are
 *       redone with {@code K} lowered to 30 below the log of the smallest alpha (or of its upper bound
 *       {@code 2 min(S_i(x0), e^K)} when it came out 0), down to {@code -725}, and the check is repeated
 *       on the new alphas (six passes at most). A single retry without a check left alphas
 *       of 1e-65 23% low and one of 1e-188 at 0 (issue 14). Alphas down to {@code 1e-300} thus keep a
 *       relative accuracy of about {@code 1e-13}; below {@code 1e-300} (where the bound {@code 2 e^-725}
 *       is no longer {@code e^30} below the alpha) only the absolute error bound {@code 2 e^-725}, about
 *       {@code 1e-315}, holds, and alphas below about {@code 4.9e-324} are 0.</li>
 *   <li>Quadrature: {@link ExactIntegrator} (shared Gauss-Legendre panels in log space).</li>
 *   <li>The alphas are not normalised; their sum differs from 1 only by the integration error (about
 *       {@code 1e-13}). A near-certain arm's alpha is capped at 1, which that error could exceed by a few
 *       units in the last place.</li>
 * </ul>
 */
public final class ExactProbabilityBest implements ProbabilityBestEstimator {
    /** First log-probability that defines each arm's range. */
    static final double LOG_TAIL = -60;
    /** Deepest log-probability used for tiny alphas. */
    private static final double DEEPEST_LOG_TAIL = -725;
    /** Integration passes at most: the first and deeper ones until every alpha clears its bound. */
    private static final int MAX_PASSES = 6;
    /** Where integrals over Beta arms reaching 1 change to coordinates centred on 1. */
    private static final double SPLIT = 0.5;
    /** Required log-ratio between an alpha and its truncation bound. */
    private static final double MARGIN = 30;
    private static final int JOINT_STEPS = 4;
    private static final double JOINT_TOLERANCE = 1.0;

    /** Creates the (stateless) estimator. */
    public ExactProbabilityBest() {
        // stateless
    }

    @Override
    public ProbabilityBest estimate(List<? extends Posterior> posteriors, long seed) {
        checkPosteriors(posteriors);
        boolean[] all = new boolean[posteriors.size()];
        Arrays.fill(all, true);
        double[] alpha = alphas(posteriors, -1, 0, all, ExactScheme.ENGINE_1_2);
        return new ProbabilityBest(alpha, new double[alpha.length], ProbabilityBest.Method.EXACT, 0);
    }

    /**
     * The exact alphas of the arms selected by {@code which} (the others are 0), with the same integrals and
     * checks as {@link #estimate}; {@link AdaptiveMonteCarlo} uses it for arms that win no draw.
     */
    static double[] selected(List<? extends Posterior> posteriors, boolean[] which) {
        checkPosteriors(posteriors);
        return alphas(posteriors, -1, 0, which.clone(), ExactScheme.ENGINE_1_2);
    }

    /**
     * {@code P(theta_leader >= max_{j != leader} theta_j - epsilon) = integral f_L(x) prod_{j != L}
     * F_j(x + epsilon) dx}, the posterior probability that the leader is within {@code epsilon} of the best
     * (the indifference-zone stopping statistic).
     *
     * @param posteriors at least two independent posteriors
     * @param leader     index of the arm in question
     * @param epsilon    the indifference margin, finite and {@code >= 0}
     * @return the probability, in {@code [0, 1]}
     */
    public static double probabilityWithin(List<? extends Posterior> posteriors, int leader, double epsilon) {
        checkPosteriors(posteriors);
        Checks.nonNegative("epsilon", epsilon);
        if (leader < 0 || leader >= posteriors.size()) {
            throw new IllegalArgumentException("leader must be an arm index in [0, " + (posteriors.size() - 1)
                    + "], got " + leader);
        }
        boolean[] only = new boolean[posteriors.size()];
        only[leader] = true;
        return alphas(posteriors, leader, epsilon, only, ExactScheme.ENGINE_1_2)[leader];
    }

    /**
     * The selected integrals, redone with deeper tails while some alpha is too small for the last pass; the
     * scheme says which arms a deeper pass integrates again and how the posteriors are evaluated.
     */
    static double[] alphas(List<? extends Posterior> given, int leader, double epsilon, boolean[] which,
                           ExactScheme scheme) {
        List<? extends Posterior> posteriors = scheme.view(given);
        double logTail = LOG_TAIL;
        List<ExactArm> arms = arms(posteriors, leader, epsilon, logTail);
        double start = jointLower(arms, logTail);
        double[] alpha = integrate(arms, start, which, posteriors, leader, epsilon, logTail, scheme);
        boolean[] again = which;
        for (int pass = 1; pass < MAX_PASSES; pass++) {
            double deeper = deeperTail(arms, start, alpha, again, logTail);
            if (!(deeper < logTail)) {
                break;
            }
            double[] previous = alpha;
            again = scheme.again(again, previous, logTail);
            logTail = deeper;
            arms = arms(posteriors, leader, epsilon, logTail);
            start = jointLower(arms, logTail);
            alpha = scheme.merge(previous, again,
                    integrate(arms, start, again, posteriors, leader, epsilon, logTail, scheme));
        }
        for (int i = 0; i < alpha.length; i++) {
            alpha[i] = Math.min(1.0, alpha[i]);
        }
        return alpha;
    }

    /**
     * The integrals from {@code start}; split at {@link #SPLIT} when a Beta range was cut below 1 (see
     * {@link #splitIntegrals}).
     */
    private static double[] integrate(List<ExactArm> arms, double start, boolean[] which, List<? extends Posterior>
            posteriors, int leader, double epsilon, double logTail, ExactScheme scheme) {
        for (ExactArm arm : arms) {
            if (arm.capped()) {
                return splitIntegrals(arms, start, which, posteriors, leader, epsilon, logTail, scheme);
            }
        }
        return integrate(arms, start, which, scheme);
    }

    /**
     * Beta arms whose mass reaches within 1e-11 of 1, where doubles are 1.1e-16 apart and a range is cut
     * ({@link ExactArm}): below {@code x = SPLIT} the integrals run in the usual coordinates; above it in
     * {@code v = theta - 1 = -(1 - theta)}, with {@code 1 - theta ~ Beta(b, a)} evaluated directly
     * ({@link Reflected}), so the end {@code theta = 1} is {@code v = 0} and a density singular there
     * ({@code b < 1}) is integrated to its end, with no closing term. The shift by 1 changes no probability
     * of being best. Before this, prior (0.1, 0.1) and arms 10/10 and 20/20 lost 1.2% of their mass.
     */
    private static double[] splitIntegrals(List<ExactArm> arms, double start, boolean[] which,
                                           List<? extends Posterior> posteriors, int leader, double epsilon,
                                           double logTail, ExactScheme scheme) {
        int n = arms.size();
        double[] from = new double[n];
        double[] to = new double[n];
        for (int i = 0; i < n; i++) {
            from[i] = start;
            to[i] = Math.min(arms.get(i).upper(), SPLIT);
        }
        double[] lower = ExactIntegrator.integrate(arms, from, to, ExactIntegrator.Own.DENSITY, which, false,
                scheme.panels());
        List<ExactArm> top = new ArrayList<>(n);
        for (int i = 0; i < n; i++) {
            double shift = leader == -1 || i == leader ? 0 : epsilon;
            top.add(new ExactArm(new Reflected(scheme.mirror(posteriors.get(i))), shift, logTail));
        }
        double topStart = Math.max(jointLower(top, logTail), SPLIT - 1);
        for (int i = 0; i < n; i++) {
            from[i] = topStart;
            to[i] = top.get(i).upper();
        }
        double[] upper = ExactIntegrator.integrate(top, from, to, ExactIntegrator.Own.DENSITY, which, true,
                scheme.panels());
        for (int i = 0; i < n; i++) {
            lower[i] += upper[i];
        }
        return lower;
    }

    private static double[] integrate(List<ExactArm> arms, double start, boolean[] which, ExactScheme scheme) {
        int n = arms.size();
        double[] from = new double[n];
        double[] to = new double[n];
        for (int i = 0; i < n; i++) {
            from[i] = start;
            to[i] = arms.get(i).upper();
        }
        return ExactIntegrator.integrate(arms, from, to, ExactIntegrator.Own.DENSITY, which, true, scheme.panels());
    }

    /**
     * The log tail needed so that every selected alpha exceeds its truncation bound by {@code e^MARGIN}, or
     * {@code logTail} when this pass suffices. An alpha computed as 0 (empty range) is bounded above by
     * {@code S_i(x0) + prod_j F_j(x0)}, since arm i can only be best above {@code x0} or when all arms are
     * below it; the second term is only bounded by {@code e^K}, so the next pass is aimed at
     * {@code 2 min(S_i(x0), e^K)}: if the alpha is larger, the pass is merely deeper than needed, and if it
     * is smaller, the following check asks for another pass.
     */
    private static double deeperTail(List<ExactArm> arms, double start, double[] alpha, boolean[] which,
                                     double logTail) {
        double needed = logTail;
        for (int i = 0; i < alpha.length; i++) {
            if (!which[i]) {
                continue;
            }
            double logAlpha = alpha[i] > 0 ? StrictMath.log(alpha[i])
                    : Math.min(arms.get(i).logSurvival(start), logTail) + StrictMath.log(2);
            needed = Math.min(needed, logAlpha - MARGIN);
        }
        if (!(needed < logTail - StrictMath.log(2)) || logTail <= DEEPEST_LOG_TAIL) {
            return logTail;
        }
        return Math.max(needed, DEEPEST_LOG_TAIL);
    }

    /**
     * Whether an alpha from a pass with tails at {@code logTail} fails the check of {@link #deeperTail} (is
     * not {@code e^MARGIN} times its truncation bound {@code 2 e^logTail}).
     */
    static boolean tooSmall(double alpha, double logTail) {
        return !(alpha > 0) || StrictMath.log(alpha) - MARGIN < logTail - StrictMath.log(2);
    }

    /**
     * A point {@code x} with {@code P(max_j theta_j <= x) = prod_j F_j(x) <= e^logTail}. Starts from the
     * largest single-arm lower end (where one factor alone is small enough) and moves right by a few Newton
     * steps on {@code sum_j log F_j(x) = logTail}, keeping only points that still satisfy the bound; with
     * many similar arms this trims several standard deviations.
     */
    private static double jointLower(List<ExactArm> arms, double logTail) {
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
            double next = x + (logTail - logP) / slope;
            if (!(logP < logTail - JOINT_TOLERANCE) || !(next > x) || !Double.isFinite(next)) {
                break;
            }
            double logNext = 0;
            for (ExactArm arm : arms) {
                logNext += arm.logCdf(next);
            }
            if (!(logNext <= logTail)) {
                break;
            }
            x = next;
        }
        return x;
    }

    /** Arms seen by the integrals; every arm except {@code leader} is shifted down by {@code epsilon}. */
    private static List<ExactArm> arms(List<? extends Posterior> posteriors, int leader, double epsilon,
                                       double logTail) {
        List<ExactArm> arms = new ArrayList<>(posteriors.size());
        for (int i = 0; i < posteriors.size(); i++) {
            double shift = leader == -1 || i == leader ? 0 : epsilon;
            arms.add(new ExactArm(posteriors.get(i), shift, logTail));
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
