package dev.runoff.engine.allocation;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.runoff.engine.best.ExactProbabilityBest;
import dev.runoff.engine.posterior.BetaPosterior;
import dev.runoff.engine.posterior.Posterior;
import dev.runoff.engine.posterior.StudentTPosterior;
import java.util.List;
import org.apache.commons.rng.UniformRandomProvider;
import org.apache.commons.rng.simple.RandomSource;
import org.junit.jupiter.api.Test;

/**
 * The closed form of top-two Thompson sampling against a direct seeded simulation of the randomised rule of
 * Russo (2020), "Simple Bayesian algorithms for best-arm identification", Operations Research 68(6): draw a
 * joint posterior sample and take its argmax as leader; with probability beta measure the leader, otherwise
 * redraw until another arm is the argmax and measure that one. The closed form uses exact alphas; each
 * simulated share is a binomial proportion, and the check allows 4 of its standard errors.
 */
class TopTwoThompsonSimulationTest {
    private static final int ROUNDS = 200_000;

    @Test
    void closedFormMatchesSimulationForThreeBernoulliArms() {
        // 12/100, 15/100 and 10/100 successes under a uniform prior
        check(List.of(new BetaPosterior(13, 89), new BetaPosterior(16, 86), new BetaPosterior(11, 91)), 0.5, 11L);
    }

    @Test
    void closedFormMatchesSimulationForFourValueArms() {
        check(List.of(new StudentTPosterior(1.0, 0.1, 20), new StudentTPosterior(1.1, 0.1, 20),
                new StudentTPosterior(0.9, 0.15, 20), new StudentTPosterior(1.05, 0.05, 20)), 0.7, 12L);
    }

    @Test
    void closedFormMatchesSimulationForFiveArmsWithAStrongLeader() {
        check(List.of(new BetaPosterior(31, 71), new BetaPosterior(21, 81), new BetaPosterior(26, 76),
                new BetaPosterior(16, 86), new BetaPosterior(40, 62)), 0.5, 13L);
    }

    @Test
    void closedFormMatchesSimulationWhenTheChallengerGetsMostMeasurements() {
        check(List.of(new BetaPosterior(13, 89), new BetaPosterior(16, 86), new BetaPosterior(11, 91)), 0.2, 14L);
    }

    private static void check(List<Posterior> posteriors, double beta, long seed) {
        double[] alpha = new ExactProbabilityBest().estimate(posteriors, 0).alpha();
        double[] psi = TopTwo.thompson(alpha, beta);
        assertEquals(1.0, Weights.sum(psi), 1e-12, "weights sum to 1");
        double[] simulated = simulate(posteriors, beta, seed);
        for (int i = 0; i < psi.length; i++) {
            double se = Math.sqrt(psi[i] * (1 - psi[i]) / ROUNDS);
            assertTrue(Math.abs(psi[i] - simulated[i]) <= 4 * se, "arm " + i + ": closed form " + psi[i]
                    + ", simulated " + simulated[i] + ", 4 standard errors " + 4 * se);
        }
    }

    /** Share of rounds in which the randomised rule measures each arm. */
    private static double[] simulate(List<Posterior> posteriors, double beta, long seed) {
        UniformRandomProvider rng = RandomSource.XO_SHI_RO_256_PP.create(seed);
        Posterior.Sampler[] samplers = posteriors.stream().map(p -> p.sampler(rng)).toArray(Posterior.Sampler[]::new);
        long[] measured = new long[samplers.length];
        for (int r = 0; r < ROUNDS; r++) {
            int leader = argmaxOfDraw(samplers);
            int arm = leader;
            if (rng.nextDouble() >= beta) {
                while (arm == leader) {
                    arm = argmaxOfDraw(samplers);
                }
            }
            measured[arm]++;
        }
        double[] share = new double[measured.length];
        for (int i = 0; i < share.length; i++) {
            share[i] = (double) measured[i] / ROUNDS;
        }
        return share;
    }

    private static int argmaxOfDraw(Posterior.Sampler[] samplers) {
        int best = 0;
        double max = samplers[0].draw();
        for (int i = 1; i < samplers.length; i++) {
            double x = samplers[i].draw();
            if (x > max) {
                max = x;
                best = i;
            }
        }
        return best;
    }
}
