package dev.runoff.engine.best;

import dev.runoff.engine.posterior.Posterior;
import java.util.List;

/**
 * The exact probability of being best of selected arms, by numerical integration; {@link AdaptiveMonteCarlo}
 * uses it for arms that win no draw. Each engine version names the integration it uses.
 */
@FunctionalInterface
public interface ExactAlphas {

    /** The quadrature of {@link ExactProbabilityBest}: the integration of engine version 1.2. */
    ExactAlphas QUADRATURE = ExactProbabilityBest::selected;

    /** The quadrature of {@link FastExactProbabilityBest}: the integration of engine version 1.3. */
    ExactAlphas FAST_QUADRATURE = FastExactProbabilityBest::selected;

    /**
     * Each selected arm's integral on its own panels from the peak of its integrand ({@link PeakQuadrature}):
     * the integration of engine version 1.4.
     */
    ExactAlphas PEAK_QUADRATURE = PeakQuadrature.V1_4::selected;

    /**
     * Engine 1.4's integration to the relative tolerance its consumers need ({@link TolerancePeakQuadrature}):
     * the integration of engine version 1.5.
     */
    ExactAlphas TOLERANCE_QUADRATURE = TolerancePeakQuadrature::selected;

    /**
     * Engine 1.5's integration with the integrand carried from node to node by Taylor steps that take no
     * exponential or logarithm ({@link SweptPeakQuadrature}): the integration of engine version 1.6.
     */
    ExactAlphas SWEPT_QUADRATURE = SweptPeakQuadrature::selected;

    /**
     * The alphas of the arms selected by {@code which}, 0 for the others.
     *
     * @throws IllegalArgumentException if fewer than two posteriors are given or one is null
     */
    double[] selected(List<? extends Posterior> posteriors, boolean[] which);
}
