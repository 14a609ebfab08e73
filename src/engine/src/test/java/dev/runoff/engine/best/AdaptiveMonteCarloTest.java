package dev.runoff.engine.best;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.runoff.engine.allocation.TopTwo;
import dev.runoff.engine.posterior.BetaPosterior;
import dev.runoff.engine.posterior.Posterior;
import dev.runoff.engine.posterior.StudentTPosterior;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;
import org.junit.jupiter.api.Test;

/**
 * The job's default estimator against reference values computed outside Java: mpmath 1.3.0 quadrature at 30
 * digits of {@code alpha_i = integral f_i(x) prod_{j != i} F_j(x) dx} (Beta densities and
 * {@code mpmath.betainc(regularized=True)}; the Student-t CDF through its incomplete-beta form), by a
 * script run for this test, values copied to 17 digits; the twenty-arm case by numpy/scipy quadrature (its
 * comment says how).
 *
 * <p>Tolerances: an arm that won draws must lie within 4 of its own recorded standard errors of the
 * reference, plus 1e-12 for the reference (a correct estimator misses by the normal approximation with
 * probability about 6e-5 per arm; the seeds are fixed, so the test is deterministic). An arm that won no
 * draw (conditional estimate by quadrature) must match the reference to a relative 1e-9, the accuracy the
 * exact integrator promises.
 */
class AdaptiveMonteCarloTest {
    private static final long SEED = 20_261_202L;
    private static final double SIGMAS = 4;
    private static final double REFERENCE_ERROR = 1e-12;

    private static List<Posterior> betas(double... ab) {
        List<Posterior> list = new ArrayList<>();
        for (int i = 0; i < ab.length; i += 2) {
            list.add(new BetaPosterior(ab[i], ab[i + 1]));
        }
        return list;
    }

    private static void assertWithinStandardErrors(double[] reference, ProbabilityBest estimate) {
        for (int i = 0; i < reference.length; i++) {
            String where = "arm " + i + " of " + estimate;
            if (estimate.conditional(i)) {
                assertEquals(reference[i], estimate.alpha(i), 1e-9 * reference[i] + Double.MIN_NORMAL, where);
            } else {
                assertEquals(reference[i], estimate.alpha(i),
                        SIGMAS * estimate.standardError(i) + REFERENCE_ERROR, where);
                assertTrue(estimate.standardError(i) > 0 || estimate.alpha(i) == 1, where);
            }
        }
        assertEquals(1.0, Arrays.stream(estimate.alpha()).sum(), 1e-12, "alphas sum to 1: " + estimate);
    }

    @Test
    void twoBetaArmsMatchTheReference() {
        // mpmath quadrature (see class comment); Miller (2015)'s closed form gives the same two-arm value.
        double[] reference = {0.14671621006603387, 0.85328378993396613};
        ProbabilityBest pb = new AdaptiveMonteCarlo(40_000).estimate(betas(11, 91, 16, 86), SEED);
        assertWithinStandardErrors(reference, pb);
    }

    @Test
    void threeNearlyTiedArmsGetMoreDrawsAndMatchTheReference() {
        // 100 of 1,000, 103 of 1,000 and 103 of 999 successes: the leader and runner-up (0.378 vs 0.373)
        // cannot be ordered by 3 standard errors at 10,000 draws, so the rule doubles (up to the cap here).
        double[] reference = {0.24915762186342969, 0.37291264448603866, 0.37792973365053166};
        ProbabilityBest pb = new AdaptiveMonteCarlo(40_000).estimate(betas(101, 901, 104, 898, 104, 897), SEED);
        assertTrue(pb.draws() > AdaptiveMonteCarlo.FIRST_STAGE, pb.toString());
        assertWithinStandardErrors(reference, pb);
    }

    @Test
    void tailArmsThatWinNoDrawGetTheirConditionalValueNotZero() {
        // Five Beta arms: 40/400, 90/420, 120/410, 180/430, 230/450 with a uniform prior. The first three
        // win none of 10,000 draws; the reference puts them at 1.5e-44, 1.0e-21 and 1.1e-11.
        double[] reference = {1.4721517607301097e-44, 1.0076515288349021e-21, 1.1441345260978008e-11,
                0.0029926502582656737, 0.99700734973029298};
        ProbabilityBest pb = new AdaptiveMonteCarlo(40_000)
                .estimate(betas(41, 361, 91, 331, 121, 291, 181, 251, 231, 221), SEED);
        assertArrayEquals(new boolean[] {true, true, true, false, false}, pb.conditional(), pb.toString());
        assertWithinStandardErrors(reference, pb);
    }

    @Test
    void studentTArmsMatchTheReference() {
        double[] reference = {0.23634489862356065, 0.67737074458029631, 0.086284356796143035};
        List<Posterior> arms = List.of(new StudentTPosterior(1.0, 0.10, 30), new StudentTPosterior(1.1, 0.12, 25),
                new StudentTPosterior(0.8, 0.2, 10));
        assertWithinStandardErrors(reference, new AdaptiveMonteCarlo(40_000).estimate(arms, SEED));
    }

    @Test
    void twentyArmsMatchTheReference() {
        // Twenty Beta arms with 80, 82, ..., 118 successes of 1,000 (uniform prior). Reference: numpy/scipy
        // 1.17.1, composite 20-point Gauss-Legendre on [0.02, 0.30] with scipy.stats.beta logpdf and logcdf,
        // 4,000 panels (2,000 panels agree to a relative 1.4e-15; the twenty values sum to 1 + 3.7e-13). The
        // first arm (1.25e-5) is the tail arm.
        double[] reference = {1.253136480996092e-05, 2.945723693627754e-05, 6.622414434086736e-05, 0.000142585191108226,
                0.0002944169054795392, 0.0005838170328013655, 0.0011133100563079118, 0.0020445116918281726,
                0.0036209204953117336, 0.006193582695661416, 0.010247384568741823, 0.01642491738546623,
                0.02554449700398672, 0.03860918470863433, 0.05680456983206381, 0.08148447831320858,
                0.1141453679885608, 0.1563916205889648, 0.20989495987467752, 0.2763516629214778};
        double[] ab = new double[40];
        for (int i = 0; i < 20; i++) {
            ab[2 * i] = 1 + 80 + 2 * i;
            ab[2 * i + 1] = 1 + 1000 - 80 - 2 * i;
        }
        ProbabilityBest pb = new AdaptiveMonteCarlo(40_000).estimate(betas(ab), SEED);
        assertWithinStandardErrors(reference, pb);
    }

    @Test
    void aLeaderThatWinsEveryDrawLeavesTheOthersPositiveAndTopTwoOutOfItsDegenerateSplit() {
        // Beta(1, 1001) vs Beta(501, 501) vs Beta(151, 851): every draw picks the second arm.
        ProbabilityBest pb = new AdaptiveMonteCarlo(10_000).estimate(betas(1, 1001, 501, 501, 151, 851), SEED);
        assertTrue(pb.alpha(0) > 0 && pb.alpha(2) > 0, pb.toString());
        assertTrue(pb.alpha(2) > pb.alpha(0), pb.toString());
        double[] weights = TopTwo.thompson(pb.alpha(), 0.5);
        // Degenerate split (TopTwo.thompson's convention for alpha exactly 1): 0.25 to each challenger.
        assertTrue(weights[2] > 0.4999 && weights[0] < 1e-100, Arrays.toString(weights));
    }

    @Test
    void clearlyOrderedArmsStopAtTheFirstStageAndTheCapBindsAtOnce() {
        List<Posterior> clear = betas(11, 91, 61, 41);
        assertEquals(AdaptiveMonteCarlo.FIRST_STAGE, new AdaptiveMonteCarlo(40_000).estimate(clear, SEED).draws());
        assertEquals(2_500, new AdaptiveMonteCarlo(2_500).estimate(clear, SEED).draws());
    }

    @Test
    void exactlyTiedArmsDrawUpToTheCap() {
        // Two identical posteriors: the order never settles and the difference's standard error at 40,000
        // draws (sqrt(1 / 40,000) = 0.005) is still above the resolution 0.0025.
        ProbabilityBest pb = new AdaptiveMonteCarlo(40_000).estimate(betas(51, 451, 51, 451), SEED);
        assertEquals(40_000, pb.draws());
    }

    @Test
    void theRecordedDrawsAsTheCapReproduceTheEstimateBitForBit() {
        List<Posterior> tied = betas(101, 901, 104, 898, 104, 897);
        ProbabilityBest first = new AdaptiveMonteCarlo(1_000_000).estimate(tied, SEED);
        assertEquals(first, new AdaptiveMonteCarlo(first.draws()).estimate(tied, SEED));
        ProbabilityBest capped = new AdaptiveMonteCarlo(30_000).estimate(tied, SEED);
        assertEquals(capped, new AdaptiveMonteCarlo(capped.draws()).estimate(tied, SEED));
    }

    @Test
    void theZeroWinUpperBoundIsTheOneSidedClopperPearsonBound() {
        // scipy 1.17.1: beta.ppf(0.95, 1, 10000) = 0.00029952835977661195, the one-sided 95% Clopper-Pearson
        // bound at 0 successes in 10,000 trials (Clopper and Pearson 1934).
        assertEquals(0.00029952835977661195, AdaptiveMonteCarlo.zeroWinUpperBound(10_000), 1e-15);
        ProbabilityBest pb = new AdaptiveMonteCarlo(10_000).estimate(betas(1, 1001, 501, 501), SEED);
        assertEquals(AdaptiveMonteCarlo.zeroWinUpperBound(10_000), pb.zeroWinUpperBound(0));
        assertTrue(Double.isNaN(pb.zeroWinUpperBound(1)));
        assertTrue(pb.alpha(0) <= pb.zeroWinUpperBound(0), pb.toString());
    }

    @Test
    void badArgumentsAreRejectedNamingThem() {
        assertTrue(assertThrows(IllegalArgumentException.class, () -> new AdaptiveMonteCarlo(0)).getMessage()
                .contains("maxDraws"));
        assertTrue(assertThrows(IllegalArgumentException.class, () -> AdaptiveMonteCarlo.zeroWinUpperBound(0))
                .getMessage().contains("draws"));
        assertFalse(new AdaptiveMonteCarlo(5).toString().isEmpty());
    }
}
