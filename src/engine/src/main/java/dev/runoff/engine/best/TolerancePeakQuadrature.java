package dev.runoff.engine.best;

import dev.runoff.engine.posterior.Posterior;
import java.util.List;

/**
 * The integration of arms that win no draw as engine version 1.5 does it: engine 1.4's {@link PeakQuadrature}
 * (each arm on its own panels from the peak of its log-concave integrand, secant bounds on the cut tails) run
 * to the tolerance its consumers need, {@value #TOLERANCE} relative, instead of about 1e-12.
 *
 * <p>Design. What reads these alphas, and how much error each can take:
 * <ul>
 *   <li>Top-two weights ({@code TopTwo#thompson}): {@code psi_i = beta a_i + (1 - beta) sum_{j != i} a_j a_i /
 *       S_j}, with {@code a} the alphas over their sum and {@code S_j} the sum of the alphas other than
 *       {@code a_j}. Every term is a product of two alphas over a sum of alphas, so a relative error of at most
 *       {@code e} in each alpha moves each term, hence each weight, by at most about {@code 3e} of itself. At
 *       {@code e = 1e-4} that is 3e-4 of a weight, thirty times below the standard error of 0.01 that
 *       {@link DecisionPrecision} already accepts for every weight from the counted alphas; so 1e-4 relative is
 *       ample. (The policy's forward difference moves counted shares only; the integrated alphas are the same
 *       on both sides of it, so their error does not enter the gradient.)</li>
 *   <li>The audit's cross-check ({@code CrossCheck}) compares each of these alphas, whose recorded standard
 *       error is 0, with engine 1.2's integration and allows 1e-9 absolute. An arm wins none of the at least
 *       1,000 first-stage draws with probability {@code (1 - alpha)^1000}: below {@code e^-30} once alpha
 *       exceeds 0.03. So the zero-win alphas are below 0.03, and a relative error {@code e} costs at most
 *       {@code 0.03 e} absolute (with a draw cap configured below 1,000 larger alphas can win no draw; their
 *       error stays within {@value #TOLERANCE} of them).</li>
 *   <li>The job takes alphas within 1e-9 outside [0, 1] onto the bounds ({@code Evaluator.bounded}); the leader's
 *       alpha is one minus the others, so their absolute error passes to it unchanged.</li>
 * </ul>
 * The binding one is the audit's: {@value #TOLERANCE} relative gives at most {@code 6e-10} absolute on an alpha
 * of 0.03 (and {@code 6e-11} on the usual zero-win alpha, below the {@code 3e-3} of the rule of three at 1,000
 * draws), inside the slack of 1e-9, and five thousand times below what the weights need.
 *
 * <p>How it is reached. The tails are cut at {@code e^-}{@value #STOP} of the integral each (by log-concavity,
 * as in {@link PeakQuadrature}: at most {@code 2 e^-20}, about 4.1e-9 relative, in total, instead of
 * {@code 2 e^-30}); the panels start {@code sqrt(2 STOP)}, 6.3, local standard deviations below the peak
 * instead of 7.7, and are {@value #FACTOR} local standard deviations wide instead of 10, with 1.4's 20-point
 * Gauss-Legendre rule. The quadrature error is measured, not bounded: against engine 1.2's integration the worst
 * relative difference was 1.7e-9 over the 7,981 trailing arms of the first 2,000 experiments of the recompute
 * pool's shapes and 9.4e-9 over 3,610 arms of 2,000 random configurations of 2 to 8 arms with up to 30,000
 * trials (the configurations of {@code PeakQuadratureTest}); on the arms with alpha below 0.03 of those sets
 * the worst absolute difference was 3.8e-11 and 1.2e-10. Candidates measured the same way and rejected: tails
 * at {@code e^-17} with panels of 10 or 12 (worst 3.9e-8 and 4.0e-8 relative: above the tolerance, by the cut
 * tails), panels of 16 (7.1e-6), 16- or 14-point rules at width 10 (3.8e-8, 1.4e-6), 12 points (4.7e-5 and
 * worse). Other posteriors fall back to engine 1.3's integration, as in 1.4. Deterministic (StrictMath).
 */
final class TolerancePeakQuadrature {
    /** Largest relative error of an alpha this integration is built and tested for. */
    static final double TOLERANCE = 2e-8;
    /** Log of the largest share of an integral either cut tail may hold. */
    static final double STOP = 20;
    /** Panel width in local standard deviations. */
    static final double FACTOR = 12;
    /** Points of the Gauss-Legendre rule on each panel (1.4's). */
    static final int POINTS = 20;
    private static final PeakQuadrature RULE = new PeakQuadrature(STOP, FACTOR, POINTS);

    private TolerancePeakQuadrature() {
    }

    /**
     * The alphas of the arms selected by {@code which} (the others are 0): the {@link ExactAlphas} of engine
     * version 1.5.
     *
     * @throws IllegalArgumentException if fewer than two posteriors are given or one is null
     */
    static double[] selected(List<? extends Posterior> posteriors, boolean[] which) {
        return RULE.selected(posteriors, which);
    }
}
