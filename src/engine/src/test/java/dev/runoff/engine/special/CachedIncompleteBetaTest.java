package dev.runoff.engine.special;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.SplittableRandom;
import org.junit.jupiter.api.Test;

class CachedIncompleteBetaTest {

    @Test
    void matchesMpmathNearTheCentreLikeEngineVersion12() {
        // Reference: mpmath 1.3.0 at 40 digits, log(betainc(408, 17913, 0, x, regularized=True)) for
        // x = 0.022349158639376615 (near (a + 1) / (a + b + 2), where the fraction converges slowest). Both
        // versions are 2.3e-13 off here.
        double x = 0.022349158639376615;
        double reference = -0.6247032479446272269;
        assertEquals(reference, new CachedIncompleteBeta(new IncompleteBeta(408, 17913)).logLower(x, 1 - x), 3e-13);
        assertEquals(reference, new IncompleteBeta(408, 17913).logLower(x, 1 - x), 3e-13);
    }

    @Test
    void stepsAlongIncreasingPointsAgreeWithTheContinuedFraction() {
        // The pool's shapes (2,000 to 20,000 trials, rates 2% to 12%): one instance walks up a grid of points
        // spaced up to 0.45 standard deviations over +-11 of them (Taylor steps from the last point), fresh
        // instances evaluate each point by the continued fraction alone. Measured: 1.3e-13 at most (relative
        // to max(1, |log I_x|)); the bound is the fraction's own error near the centre (test above).
        SplittableRandom random = new SplittableRandom(7);
        double worst = 0;
        for (int shape = 0; shape < 40; shape++) {
            long trials = 2_000 + random.nextInt(18_000);
            long wins = Math.round(trials * (0.02 + 0.1 * random.nextDouble()));
            IncompleteBeta beta = new IncompleteBeta(1 + wins, 1 + trials - wins);
            double a = beta.a();
            double b = beta.b();
            double mean = a / (a + b);
            double spread = Math.sqrt(a * b / ((a + b) * (a + b) * (a + b + 1)));
            CachedIncompleteBeta walking = new CachedIncompleteBeta(beta);
            for (double z = -11; z <= 11; z += 0.45 * random.nextDouble()) {
                double x = mean + z * spread;
                double stepped = walking.logLower(x, 1 - x);
                double direct = new CachedIncompleteBeta(beta).logLower(x, 1 - x);
                double error = Math.abs(stepped - direct) / Math.max(1, Math.abs(direct));
                worst = Math.max(worst, error);
            }
        }
        assertTrue(worst < 3e-13, "worst difference " + worst);
    }
}
