package dev.runoff.engine.stopping;

import dev.runoff.engine.core.Checks;
import org.apache.commons.math3.optim.MaxEval;
import org.apache.commons.math3.optim.nonlinear.scalar.GoalType;
import org.apache.commons.math3.optim.univariate.BrentOptimizer;
import org.apache.commons.math3.optim.univariate.SearchInterval;
import org.apache.commons.math3.optim.univariate.UnivariateObjectiveFunction;

/**
 * The calibration function {@code C_G} of Kaufmann &amp; Koolen (2021), "Mixture Martingales Revisited with
 * Applications to Sequential Tests and Confidence Intervals", JMLR 22, and the Riemann zeta function it
 * needs.
 *
 * <p>Written from memory of the paper (not from a copy in front of us), cross-checked against a public
 * implementation of the same formulas: {@code C_G(x) = min_{lambda in (1/2, 1)} (g_G(lambda) + x) / lambda}
 * with {@code g_G(lambda) = 2 lambda - 2 lambda log(4 lambda) + log zeta(2 lambda) - log(1 - lambda) / 2}.
 * {@code C_G(x) = x + O(log x)}: the threshold grows like the confidence level {@code log(1/delta)} plus lower
 * order terms.
 */
final class GaussianCalibration {
    private static final double[] BERNOULLI_OVER_FACTORIAL = {
        1.0 / 6 / 2, -1.0 / 30 / 24, 1.0 / 42 / 720, -1.0 / 30 / 40320, 5.0 / 66 / 3628800,
        -691.0 / 2730 / 479001600.0,
    };
    private static final int EULER_MACLAURIN_N = 10;
    private static final double LAMBDA_LOW = 0.5 + 1e-9;
    private static final double LAMBDA_HIGH = 1 - 1e-12;

    private GaussianCalibration() {
    }

    /**
     * Riemann zeta for real {@code s > 1}, by Euler-Maclaurin summation with N = 10 and six Bernoulli-number
     * correction terms (the Euler-Maclaurin summation formula, e.g. Abramowitz &amp; Stegun 23.1.30, from
     * memory): the remainder is far below double precision for {@code s} in (1, 4].
     */
    static double zeta(double s) {
        if (!(s > 1) || !Double.isFinite(s)) {
            throw new IllegalArgumentException("zeta argument s must be a finite number > 1, got " + s);
        }
        double sum = 0;
        for (int n = 1; n < EULER_MACLAURIN_N; n++) {
            sum += StrictMath.pow(n, -s);
        }
        double nPow = StrictMath.pow(EULER_MACLAURIN_N, -s);
        sum += EULER_MACLAURIN_N * nPow / (s - 1) + nPow / 2;
        double rising = s;
        double power = nPow / EULER_MACLAURIN_N;
        for (int k = 0; k < BERNOULLI_OVER_FACTORIAL.length; k++) {
            sum += BERNOULLI_OVER_FACTORIAL[k] * rising * power;
            rising *= (s + 2 * k + 1) * (s + 2 * k + 2);
            power /= (double) EULER_MACLAURIN_N * EULER_MACLAURIN_N;
        }
        return sum;
    }

    /** {@code g_G(lambda)} for lambda in (1/2, 1). */
    static double g(double lambda) {
        return 2 * lambda - 2 * lambda * StrictMath.log(4 * lambda) + StrictMath.log(zeta(2 * lambda))
                - StrictMath.log(1 - lambda) / 2;
    }

    /** {@code C_G(x)} for {@code x >= 0}, minimised over lambda with Commons Math's Brent optimiser. */
    static double cG(double x) {
        Checks.nonNegative("C_G argument x", x);
        BrentOptimizer optimizer = new BrentOptimizer(1e-12, 1e-14);
        return optimizer.optimize(new MaxEval(1000), GoalType.MINIMIZE,
                new UnivariateObjectiveFunction(lambda -> (g(lambda) + x) / lambda),
                new SearchInterval(LAMBDA_LOW, LAMBDA_HIGH)).getValue();
    }
}
