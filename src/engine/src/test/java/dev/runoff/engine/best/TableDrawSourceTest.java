package dev.runoff.engine.best;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertInstanceOf;
import static org.junit.jupiter.api.Assertions.assertNotEquals;
import static org.junit.jupiter.api.Assertions.assertSame;

import dev.runoff.engine.posterior.BetaPosterior;
import dev.runoff.engine.posterior.BetaTableSampler;
import dev.runoff.engine.posterior.Posterior;
import dev.runoff.engine.posterior.StudentTPosterior;
import java.util.List;
import org.apache.commons.rng.simple.RandomSource;
import org.junit.jupiter.api.Test;

/**
 * Monte Carlo P(best) with the table draw source agrees with the exact integration and with a published
 * closed form. Each comparison allows 4 standard errors of the true value,
 * {@code sqrt(alpha (1 - alpha) / M)} (a false alarm about 6e-5 per comparison for a correct sampler, by
 * the normal approximation), plus 1e-9 for the reference's own error.
 */
class TableDrawSourceTest {
    private static final int DRAWS = 200_000;
    private static final long SEED = 515L;

    private static void assertAgreesWithExact(List<? extends Posterior> arms) {
        ProbabilityBest exact = new ExactProbabilityBest().estimate(arms, SEED);
        ProbabilityBest sampled = new MonteCarloProbabilityBest(DRAWS, TableDrawSource.always()).estimate(arms, SEED);
        for (int i = 0; i < arms.size(); i++) {
            double truth = exact.alpha(i);
            double se = Math.sqrt(truth * (1 - truth) / DRAWS);
            assertEquals(truth, sampled.alpha(i), 4 * se + 1e-9, "alpha of arm " + i + " in " + sampled);
        }
    }

    @Test
    void fiveThousandTrialArmsAgreeWithExactIntegration() {
        assertAgreesWithExact(List.of(new BetaPosterior(101, 901), new BetaPosterior(111, 891),
                new BetaPosterior(121, 881), new BetaPosterior(131, 871), new BetaPosterior(141, 861)));
    }

    @Test
    void closeArmsWithLargeShapesAgreeWithExactIntegration() {
        assertAgreesWithExact(List.of(new BetaPosterior(40_001, 960_001), new BetaPosterior(40_101, 959_901),
                new BetaPosterior(40_201, 959_801)));
    }

    @Test
    void armsWithModesAtTheEndsAndSmallShapesAgreeWithExactIntegration() {
        assertAgreesWithExact(List.of(new BetaPosterior(1, 60), new BetaPosterior(2, 40), new BetaPosterior(1, 1),
                new BetaPosterior(3, 1)));
    }

    @Test
    void mixedFamiliesFallBackAndAgreeWithExactIntegration() {
        assertAgreesWithExact(List.of(new BetaPosterior(0.5, 3), new BetaPosterior(2, 9), new BetaPosterior(1.5, 0.8)));
        assertAgreesWithExact(List.of(new StudentTPosterior(0.1, 0.02, 30), new StudentTPosterior(0.12, 0.03, 8)));
    }

    @Test
    void twoArmsMatchTheMillerClosedForm() {
        // Miller (2015), "Formulas for Bayesian A/B Testing"; 521/646 as quoted in MonteCarloProbabilityBestTest
        // from Cook's MD Anderson technical report.
        ProbabilityBest p = new MonteCarloProbabilityBest(DRAWS, TableDrawSource.always())
                .estimate(List.of(new BetaPosterior(4, 8), new BetaPosterior(6, 6)), SEED);
        double truth = 521.0 / 646.0;
        assertEquals(truth, p.alpha(1), 4 * Math.sqrt(truth * (1 - truth) / DRAWS));
    }

    @Test
    void sameSeedGivesTheSameEstimateAndOtherDrawsThanThePosteriorSource() {
        List<BetaPosterior> arms = List.of(new BetaPosterior(31, 970), new BetaPosterior(36, 965));
        MonteCarloProbabilityBest table = new MonteCarloProbabilityBest(10_000, TableDrawSource.always());
        assertArrayEquals(table.estimate(arms, 9).alpha(), table.estimate(arms, 9).alpha());
        Posterior.Sampler viaTable = TableDrawSource.always()
                .sampler(arms.get(0), RandomSource.XO_SHI_RO_256_PP.create(9));
        Posterior.Sampler own = arms.get(0).sampler(RandomSource.XO_SHI_RO_256_PP.create(9));
        assertNotEquals(own.draw(), viaTable.draw());
    }

    @Test
    void unsupportedPosteriorsGetTheirOwnSamplersDraws() {
        for (Posterior p : List.of(new BetaPosterior(0.7, 4), new BetaPosterior(1e200, 3e200),
                new StudentTPosterior(1, 2, 5))) {
            Posterior.Sampler own = p.sampler(RandomSource.XO_SHI_RO_256_PP.create(4));
            Posterior.Sampler viaSource = TableDrawSource.always().sampler(p, RandomSource.XO_SHI_RO_256_PP.create(4));
            for (int i = 0; i < 100; i++) {
                assertEquals(own.draw(), viaSource.draw(), "draw " + i + " of " + p);
            }
        }
        assertInstanceOf(BetaTableSampler.class,
                TableDrawSource.always().sampler(new BetaPosterior(1, 4), RandomSource.XO_SHI_RO_256_PP.create(4)));
    }

    @Test
    void fewDrawsUseThePosteriorSource() {
        assertSame(DrawSource.POSTERIOR, TableDrawSource.forDraws(TableDrawSource.MIN_DRAWS - 1));
        assertSame(TableDrawSource.always(), TableDrawSource.forDraws(TableDrawSource.MIN_DRAWS));
    }
}
