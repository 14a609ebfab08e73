package dev.runoff.engine.best;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.runoff.engine.posterior.BetaPosterior;
import dev.runoff.engine.posterior.Posterior;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;
import java.util.SplittableRandom;
import org.junit.jupiter.api.Test;

/**
 * Engine version 1.3's exact estimator against engine version 1.2's: {@link ExactProbabilityBestTest} holds
 * both to the outside references; here they must agree with each other, on the pool's shapes within
 * {@link #ABSOLUTE} plus {@link #RELATIVE} times the 1.2 alpha with the 1.3 alphas summing to 1 within
 * {@link #SUM} (measured: 3.1e-14, 1.5e-13 and 3.2e-14 at most), and on random and extreme configurations
 * within the looser {@link #EXTREME} (measured: 1.4e-12 absolute, 3.6e-12 relative, sums within 2.2e-12,
 * all from three arms of 500,000 to 1,000,000 trials with 0 or 1 successes, where both versions' log
 * distribution functions are off by up to 7e-11 from mpmath 1.3.0 at 40 digits, checked at a few points
 * by hand, and 1.3's alphas are the further from mpmath's integral: arm 3's 0.3911106844449658 is
 * 2.3e-13 from 1.2's and 3.8e-12 from 1.3's, relative).
 *
 * <p>Why these tolerances: both integrations are designed to about 1e-13 relative (the truncation bound
 * {@code 2 e^-60} is checked to be {@code e^30} below every alpha, so a tiny alpha may differ by up to
 * {@code 2 e^-30}, about 1.9e-13, relative in either; see {@link ExactProbabilityBest}), and the continued
 * fraction of 1.2 is itself off by up to 2.3e-13 in {@code log F} near an arm's centre (see
 * {@code CachedIncompleteBeta}). The weights read the alphas through sums and ratios and the job rounds what
 * it records to {@code Evaluator.ROUNDING} = 1e-9; differences four orders of magnitude below that cannot
 * move a weight by a rounding step except at an exact tie of the rounding, which any change of arithmetic
 * can flip (hence a new engine version).
 */
class FastExactProbabilityBestTest {
    static final double ABSOLUTE = 1e-13;
    static final double RELATIVE = 1e-12;
    static final double SUM = 1e-13;
    static final double EXTREME = 1e-11;

    private final ExactProbabilityBest earlier = new ExactProbabilityBest();
    private final FastExactProbabilityBest fast = new FastExactProbabilityBest();

    @Test
    void agreesWithEngineVersion12OnThePoolOfTheRecomputeBench() {
        // The pool's shapes: 2,000 to 20,000 trials and rates of 2% to 12% per arm, uniform prior.
        SplittableRandom random = new SplittableRandom(10_000);
        for (int e = 0; e < 400; e++) {
            List<Posterior> arms = new ArrayList<>();
            for (int arm = 0; arm < 5; arm++) {
                long trials = 2_000 + random.nextInt(18_000);
                long wins = Math.round(trials * (0.02 + 0.1 * random.nextDouble()));
                arms.add(new BetaPosterior(1 + wins, 1 + trials - wins));
            }
            agree(arms, ABSOLUTE, RELATIVE, SUM);
        }
    }

    @Test
    void agreesWithEngineVersion12OnRandomAndExtremeConfigurations() {
        SplittableRandom random = new SplittableRandom(2026_12_02L);
        for (int config = 0; config < 200; config++) {
            agree(ExactProbabilityBestTest.randomConfiguration(random, 2 + random.nextInt(19), config % 2 == 0),
                    EXTREME, EXTREME, EXTREME);
        }
        for (List<Posterior> arms : extremes()) {
            agree(arms, EXTREME, EXTREME, EXTREME);
        }
    }

    @Test
    void integratesOnlyTheSelectedArmsForTheMonteCarloEstimator() {
        List<Posterior> arms = List.of(beta(1_201, 8_801), beta(1_101, 8_901), beta(1_001, 9_001),
                beta(901, 9_101), beta(201, 9_801));
        double[] all = fast.estimate(arms, 0).alpha();
        boolean[] which = {false, true, false, true, true};
        double[] some = ExactAlphas.FAST_QUADRATURE.selected(arms, which);
        for (int i = 0; i < which.length; i++) {
            if (which[i]) {
                assertEquals(all[i], some[i], ABSOLUTE + RELATIVE * all[i], "arm " + i);
            } else {
                assertEquals(0.0, some[i], "arm " + i);
            }
        }
        assertTrue(some[4] > 0 && some[4] < 1e-100, "a tiny alpha: " + some[4]);
    }

    @Test
    void isDeterministicAndRejectsBadInputLikeEngineVersion12() {
        List<Posterior> arms = List.of(beta(12, 40), beta(15, 37), beta(3, 9));
        ProbabilityBest first = fast.estimate(arms, 1);
        assertEquals(first, new FastExactProbabilityBest().estimate(arms, 99));
        assertArrayEquals(new double[3], first.standardError());
        assertEquals(ProbabilityBest.Method.EXACT, first.method());
        IllegalArgumentException none = assertThrows(IllegalArgumentException.class, () -> fast.estimate(null, 0));
        assertEquals("posteriors must not be null", none.getMessage());
        IllegalArgumentException one = assertThrows(IllegalArgumentException.class,
                () -> fast.estimate(List.of(beta(1, 1)), 0));
        assertEquals("posteriors must hold at least two arms, got 1", one.getMessage());
        IllegalArgumentException nul = assertThrows(IllegalArgumentException.class,
                () -> ExactAlphas.FAST_QUADRATURE.selected(Arrays.asList(beta(1, 1), null), new boolean[2]));
        assertEquals("posterior of arm 1 must not be null", nul.getMessage());
    }

    private static List<List<Posterior>> extremes() {
        return List.of(
                List.of(beta(0.1, 10.1), beta(0.1, 20.1), beta(10.1, 0.1)),
                List.of(beta(1, 1_000_001), beta(2, 1_000_000), beta(1, 500_001)),
                List.of(beta(500_001, 500_001), beta(500_501, 499_501), beta(499_001, 501_001)),
                List.of(beta(501, 501), beta(1, 1001), beta(151, 851), beta(40, 3000)),
                List.of(beta(2_401, 17_601), beta(2_400, 17_602), beta(41, 1_961), beta(1_001, 9_001)),
                List.of(beta(1, 1), beta(1, 1), beta(2, 1)),
                List.of(beta(0.5, 0.5), beta(3, 30), beta(12, 90), beta(1.5, 0.4)));
    }

    private static BetaPosterior beta(double a, double b) {
        return new BetaPosterior(a, b);
    }

    private void agree(List<Posterior> arms, double absolute, double relative, double sumTolerance) {
        double[] old = earlier.estimate(arms, 0).alpha();
        double[] now = fast.estimate(arms, 0).alpha();
        double sum = 0;
        for (int i = 0; i < old.length; i++) {
            double difference = Math.abs(now[i] - old[i]);
            assertTrue(difference <= absolute + relative * old[i], arms + " arm " + i + ": " + now[i]
                    + " against " + old[i]);
            sum += now[i];
        }
        assertEquals(1.0, sum, sumTolerance, arms.toString());
    }
}
