package dev.runoff.engine.best;

import dev.runoff.engine.posterior.Posterior;
import java.util.List;

/**
 * Engine version 1.6's integration of arms that win no draw ({@link SweptPeakQuadrature}): every check of
 * {@link TolerancePeakQuadratureTest} (engine 1.2's integration on the pool's shapes and on random
 * configurations, mpmath 1.3.0 down to an alpha near 1e-53, Commons Math 3.6.1, the fallback, the audit's absolute
 * slack), held to the same tolerance of {@value SweptPeakQuadrature#TOLERANCE} relative.
 */
class SweptPeakQuadratureTest extends TolerancePeakQuadratureTest {

    @Override
    double[] selected(List<Posterior> arms, boolean[] which) {
        return SweptPeakQuadrature.selected(arms, which);
    }

    @Override
    double relative() {
        return SweptPeakQuadrature.TOLERANCE;
    }
}
