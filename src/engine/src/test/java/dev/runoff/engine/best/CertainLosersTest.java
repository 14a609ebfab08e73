package dev.runoff.engine.best;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.runoff.engine.posterior.BetaPosterior;
import dev.runoff.engine.posterior.Posterior;
import dev.runoff.engine.posterior.StudentTPosterior;
import java.util.List;
import java.util.SplittableRandom;
import org.junit.jupiter.api.Test;

/**
 * Engine version 1.5's arms left out of the draws ({@link CertainLosers}): the union bound against exact alphas
 * (engine 1.2's integration, {@link ExactProbabilityBest}, held to Commons Math and mpmath in
 * {@link ExactProbabilityBestTest}), and what the estimator does with the arms it leaves out.
 */
class CertainLosersTest {
    private static final int CAP = 40_000;
    /** One arm far behind: 30 in 2,000 against 300 in 2,000 (1.5% against 15%). */
    private static final List<Posterior> HOPELESS = List.of(new BetaPosterior(31, 1_971),
            new BetaPosterior(301, 1_701), new BetaPosterior(281, 1_721));

    @Test
    void theBoundIsNeverBelowTheExactAlphaOnThePoolsShapes() {
        SplittableRandom random = new SplittableRandom(10_000);
        int compared = 0;
        for (int e = 0; e < 300; e++) {
            compared += boundsHold(TestArms.poolShaped(random));
        }
        assertEquals(1_200, compared);
    }

    @Test
    void theBoundIsNeverBelowTheExactAlphaOnRandomConfigurations() {
        // Some configurations with shapes below 1 (Jeffreys prior).
        SplittableRandom random = new SplittableRandom(21);
        int compared = 0;
        for (int e = 0; e < 300; e++) {
            compared += boundsHold(TestArms.anyShape(random, random.nextBoolean() ? 1 : 0.5));
        }
        assertTrue(compared > 1_000, "compared " + compared + " arms");
    }

    @Test
    void aHopelessArmIsLeftOutAndTheLeaderAndOneOtherAreAlwaysDrawn() {
        assertArrayEquals(new boolean[] {false, true, true}, CertainLosers.drawn(HOPELESS, CAP));
        List<Posterior> two = List.of(HOPELESS.get(0), HOPELESS.get(1));
        assertArrayEquals(new boolean[] {true, true}, CertainLosers.drawn(two, CAP));
        List<Posterior> close = List.of(new BetaPosterior(101, 1_901), new BetaPosterior(111, 1_891),
                new BetaPosterior(95, 1_907));
        assertArrayEquals(new boolean[] {true, true, true}, CertainLosers.drawn(close, CAP));
    }

    @Test
    void nonBetaPosteriorsAreAlwaysDrawnAndABadCapIsRejected() {
        List<Posterior> t = List.of(new StudentTPosterior(0.0, 0.01, 30), new StudentTPosterior(5.0, 0.01, 30),
                new StudentTPosterior(5.1, 0.01, 30));
        assertArrayEquals(new boolean[] {true, true, true}, CertainLosers.drawn(t, CAP));
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class,
                () -> CertainLosers.drawn(HOPELESS, 0));
        assertEquals("maxDraws must be >= 1, got 0", e.getMessage());
    }

    @Test
    void anArmLeftOutWinsNothingAndGetsItsIntegratedAlphaReproducibly() {
        AdaptiveMonteCarlo estimator = new AdaptiveMonteCarlo(CAP, new DecisionPrecision(AlphaReaders.LEADER),
                TableDrawSource.always(), ExactAlphas.TOLERANCE_QUADRATURE, DrawnArms.LEAVE_OUT_CERTAIN_LOSERS);
        ProbabilityBest first = estimator.estimate(HOPELESS, 9L);
        assertEquals(first, estimator.estimate(HOPELESS, 9L));
        assertTrue(first.conditional()[0]);
        double integrated = TolerancePeakQuadrature.selected(HOPELESS, new boolean[] {true, false, false})[0];
        assertEquals(integrated, first.alpha()[0]);
        assertEquals(0.0, first.standardError()[0]);
        assertTrue(first.alpha()[1] > 0.5, "the leader's alpha " + first.alpha()[1]);
    }

    @Test
    void leavingArmsOutChangesNoEstimateOnThePoolsShapes() {
        // Each arm on its own stream: leaving an arm out must not move the others' draws, so every estimate equals
        // the one with every arm drawn (a winner changes with probability below 1e-9 per estimate).
        SplittableRandom random = new SplittableRandom(10_000);
        AlphaReaders readers = new AlphaReaders(a -> a, 1, null);
        int leftOut = 0;
        for (int e = 0; e < 300; e++) {
            List<Posterior> arms = TestArms.poolShaped(random);
            for (boolean drawn : CertainLosers.drawn(arms, CAP)) {
                leftOut += drawn ? 0 : 1;
            }
            assertEquals(estimator(DrawnArms.ALL_OWN_STREAMS, readers).estimate(arms, e),
                    estimator(DrawnArms.LEAVE_OUT_CERTAIN_LOSERS, readers).estimate(arms, e), "experiment " + e);
        }
        assertTrue(leftOut > 100, "arms left out: " + leftOut);
    }

    private static AdaptiveMonteCarlo estimator(DrawnArms arms, AlphaReaders readers) {
        return new AdaptiveMonteCarlo(CAP, new DecisionPrecision(readers), TableDrawSource.always(),
                ExactAlphas.TOLERANCE_QUADRATURE, arms);
    }

    /** Checks the bound of every arm but the leader against its exact alpha; returns how many. */
    private static int boundsHold(List<Posterior> arms) {
        int leader = CertainLosers.leader(arms);
        boolean[] which = new boolean[arms.size()];
        for (int i = 0; i < which.length; i++) {
            which[i] = i != leader;
        }
        double[] exact = ExactProbabilityBest.selected(arms, which);
        int compared = 0;
        for (int j = 0; j < arms.size(); j++) {
            if (j != leader) {
                double bound = CertainLosers.bound(arms.get(j), arms.get(leader));
                assertTrue(bound >= exact[j], "arm " + j + ": bound " + bound + " below alpha " + exact[j]
                        + " of " + arms);
                compared++;
            }
        }
        return compared;
    }
}
