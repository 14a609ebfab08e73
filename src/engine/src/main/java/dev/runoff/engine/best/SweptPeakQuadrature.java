package dev.runoff.engine.best;

import dev.runoff.engine.posterior.Posterior;
import java.util.List;

/**
 * The integration of arms that win no draw as engine version 1.6 does it: engine 1.5's
 * {@link TolerancePeakQuadrature} (the same panels, tails and tolerance of {@value #TOLERANCE} relative) with the
 * integrand evaluated at the nodes by {@link SweptIntegrand}: the distribution functions of the other arms and
 * the own density carried from node to node by Taylor steps that need no exponential or logarithm, and one
 * logarithm per node for their product.
 *
 * <p>Design. In engine 1.5's profile of the Monte Carlo recompute the zero-win integration was about a third of
 * the time, nearly all of it the distribution functions at the nodes, and of those most of it the exponential,
 * logarithm and log density each step took (src/docs/performance.md, "Engine 1.6"). The nodes, and so the
 * quadrature and tail errors, are 1.5's; what changes is the rounding of the node values (at most about 1.5e-9
 * relative by {@link dev.runoff.engine.special.SweptBeta}'s bound over a chain of steps, 1.3e-12 in
 * {@code log F} as measured against Commons Math) and where an arm whose distribution function is within 1e-15
 * of 1 is left out, against a tolerance of 2e-8. Measured against engine
 * 1.2's integration: the figures are in src/docs/performance.md, and {@code SweptPeakQuadratureTest} holds it to
 * every check of 1.5's integration. Other posteriors fall back to engine 1.3's integration, as in 1.4 and 1.5.
 * Deterministic (StrictMath).
 */
final class SweptPeakQuadrature {
    /** Largest relative error of an alpha this integration is built and tested for (as engine 1.5). */
    static final double TOLERANCE = TolerancePeakQuadrature.TOLERANCE;
    private static final PeakQuadrature RULE = new PeakQuadrature(TolerancePeakQuadrature.STOP,
            TolerancePeakQuadrature.FACTOR, TolerancePeakQuadrature.POINTS, SweptIntegrand::of);

    private SweptPeakQuadrature() {
    }

    /**
     * The alphas of the arms selected by {@code which} (the others are 0): the {@link ExactAlphas} of engine
     * version 1.6.
     *
     * @throws IllegalArgumentException if fewer than two posteriors are given or one is null
     */
    static double[] selected(List<? extends Posterior> posteriors, boolean[] which) {
        return RULE.selected(posteriors, which);
    }
}
