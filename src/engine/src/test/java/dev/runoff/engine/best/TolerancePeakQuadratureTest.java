package dev.runoff.engine.best;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.runoff.engine.posterior.Posterior;
import java.util.Arrays;
import java.util.List;
import java.util.SplittableRandom;
import org.junit.jupiter.api.Test;

/**
 * Engine version 1.5's integration of arms that win no draw ({@link TolerancePeakQuadrature}): every check of
 * {@link PeakQuadratureTest} (engine 1.2's integration on the pool's shapes and on random configurations, mpmath
 * 1.3.0 down to an alpha near 1e-53, Commons Math 3.6.1, the fallback), held to its stated tolerance of
 * {@value TolerancePeakQuadrature#TOLERANCE} relative instead of 1e-9, and the absolute error the audit's
 * cross-check allows.
 */
class TolerancePeakQuadratureTest extends PeakQuadratureTest {
    /** The audit's slack for an integrated alpha (CrossCheck.SLACK in the audit module). */
    private static final double AUDIT_SLACK = 1e-9;
    /** An arm with a larger alpha wins some of 1,000 draws but with probability below e^-30. */
    private static final double LARGEST_ZERO_WIN_ALPHA = 0.03;

    @Override
    double[] selected(List<Posterior> arms, boolean[] which) {
        return TolerancePeakQuadrature.selected(arms, which);
    }

    @Override
    double relative() {
        return TolerancePeakQuadrature.TOLERANCE;
    }

    @Test
    void staysFarInsideTheAuditSlackOnEveryAlphaThatCanWinNoDraw() {
        // Random configurations as PeakQuadratureTest's second test, a different seed; reference: engine 1.2.
        SplittableRandom random = new SplittableRandom(15);
        double worst = 0;
        int compared = 0;
        for (int e = 0; e < 200; e++) {
            List<Posterior> arms = TestArms.anyShape(random, 1);
            int k = arms.size();
            boolean[] which = new boolean[k];
            Arrays.fill(which, true);
            double[] reference = ExactProbabilityBest.selected(arms, which);
            double[] alpha = selected(arms, which);
            for (int i = 0; i < k; i++) {
                if (reference[i] < LARGEST_ZERO_WIN_ALPHA) {
                    worst = Math.max(worst, Math.abs(alpha[i] - reference[i]));
                    compared++;
                }
            }
        }
        assertTrue(compared > 300, "compared " + compared + " arms");
        // The tolerance bounds the absolute error by 0.03 x 2e-8 = 6e-10, inside the slack.
        assertTrue(LARGEST_ZERO_WIN_ALPHA * TolerancePeakQuadrature.TOLERANCE < AUDIT_SLACK);
        assertEquals(0.0, worst, LARGEST_ZERO_WIN_ALPHA * TolerancePeakQuadrature.TOLERANCE);
    }
}
