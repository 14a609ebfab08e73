package dev.runoff.engine;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNotEquals;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertSame;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.runoff.engine.allocation.AllocationMethod;
import dev.runoff.engine.best.AdaptiveMonteCarlo;
import dev.runoff.engine.best.AlphaReaders;
import dev.runoff.engine.best.LeaderThreshold;
import dev.runoff.engine.best.ProbabilityBest;
import dev.runoff.engine.core.Arm;
import dev.runoff.engine.core.Metric;
import dev.runoff.engine.posterior.Posterior;
import dev.runoff.engine.stats.BernoulliStats;
import java.util.List;
import java.util.Optional;
import org.junit.jupiter.api.Test;

/** The supported arithmetics, and that the engine computes with the one it was built for. */
class EngineVersionTest {
    private static final EngineConfig BERNOULLI = EngineConfig.defaults(Metric.BERNOULLI);
    /** Clearly ordered arms: 1.2 stops at its first stage of 10,000 draws, 1.3 at its first of 1,000. */
    private static final List<Arm> CLEAR = List.of(arm("a", 60, 1_000), arm("b", 140, 1_000), arm("c", 90, 1_000));

    private static Arm arm(String name, long successes, long trials) {
        return new Arm(name, new BernoulliStats(trials, successes));
    }

    private static List<Posterior> posteriors(List<Arm> arms) {
        return arms.stream().map(a -> BERNOULLI.prior().posterior(a.stats())).toList();
    }

    @Test
    void versionsAreFoundByTheirLabelsAndTheCurrentOneIsWhatNewEvaluationsRecord() {
        assertEquals("1.2, 1.3, 1.4, 1.5, 1.6", EngineVersion.supported());
        assertSame(EngineVersion.V1_2, EngineVersion.of("1.2"));
        assertSame(EngineVersion.V1_3, EngineVersion.of("1.3"));
        assertSame(EngineVersion.V1_4, EngineVersion.of("1.4"));
        assertSame(EngineVersion.V1_5, EngineVersion.of("1.5"));
        assertSame(EngineVersion.V1_6, EngineVersion.of("1.6"));
        assertEquals(Optional.empty(), EngineVersion.find("1.1"));
        assertSame(EngineVersion.V1_6, EngineVersion.CURRENT);
        assertEquals(EngineVersion.CURRENT.label(), AllocationEngine.VERSION);
        assertSame(EngineVersion.CURRENT, new AllocationEngine().version());
        assertEquals(AllocationEngine.VERSION, new AllocationEngine().evaluate(CLEAR, BERNOULLI, 3L).engineVersion());
    }

    @Test
    void anUnknownVersionIsRejectedNamingTheSupportedOnes() {
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class, () -> EngineVersion.of("1.1"));
        assertEquals("engine version '1.1' is not supported; supported: 1.2, 1.3, 1.4, 1.5, 1.6", e.getMessage());
        assertThrows(NullPointerException.class, () -> new AllocationEngine(null));
    }

    @Test
    void version12IsTheFrozenEstimatorWhateverTheEvaluationReads() {
        List<Posterior> posteriors = posteriors(CLEAR);
        ProbabilityBest frozen = new AdaptiveMonteCarlo(40_000).estimate(posteriors, 11L);
        AlphaReaders everything = new AlphaReaders(a -> a, 2, new LeaderThreshold(0.999, 3));
        assertEquals(frozen, EngineVersion.V1_2.monteCarlo(40_000, everything).estimate(posteriors, 11L));
        assertEquals(frozen, EngineVersion.V1_2.monteCarlo(40_000, AlphaReaders.LEADER).estimate(posteriors, 11L));
        assertEquals(AdaptiveMonteCarlo.FIRST_STAGE, frozen.draws());
    }

    @Test
    void eachEngineRecordsItsVersionAndUsesItsEstimators() {
        for (EngineVersion version : EngineVersion.values()) {
            AllocationEngine engine = new AllocationEngine(version);
            Evaluation sampled = engine.evaluate(CLEAR, BERNOULLI, 5L);
            assertEquals(version.label(), sampled.engineVersion());
            assertEquals(version.monteCarlo(BERNOULLI.draws(), AllocationEngine.readers(BERNOULLI, posteriors(CLEAR)))
                    .estimate(posteriors(CLEAR), 5L), sampled.probabilityBest(), version.label());
            Evaluation exact = engine.evaluate(CLEAR, BERNOULLI.withMethod(EngineConfig.MethodChoice.EXACT), 5L);
            assertEquals(version.exact().estimate(posteriors(CLEAR), 5L), exact.probabilityBest(), version.label());
        }
    }

    @Test
    void version13DiffersFrom12WhereItsDrawPolicyDiffers() {
        Evaluation old = new AllocationEngine(EngineVersion.V1_2).evaluate(CLEAR, BERNOULLI, 5L);
        Evaluation current = new AllocationEngine(EngineVersion.V1_3).evaluate(CLEAR, BERNOULLI, 5L);
        assertEquals(10_000, old.probabilityBest().draws());
        assertEquals(1_000, current.probabilityBest().draws());
        assertNotEquals(old.probabilityBest(), current.probabilityBest());
    }

    @Test
    void version14KeepsTheDrawsOf13AndIntegratesTheArmsThatWinNone() {
        Evaluation earlier = new AllocationEngine(EngineVersion.V1_3).evaluate(CLEAR, BERNOULLI, 5L);
        Evaluation current = new AllocationEngine(EngineVersion.V1_4).evaluate(CLEAR, BERNOULLI, 5L);
        ProbabilityBest a = earlier.probabilityBest();
        ProbabilityBest b = current.probabilityBest();
        assertEquals(a.draws(), b.draws());
        for (int i = 0; i < a.alpha().length; i++) {
            // Same draws: counted alphas equal; integrated ones within PeakQuadratureTest's relative tolerance.
            assertEquals(a.alpha()[i], b.alpha()[i], 1e-9 * a.alpha()[i] + 1e-15, "arm " + i);
        }
    }

    @Test
    void version15AgreesWith14WithinTheDrawsErrorAndIntegratesTheArmsThatWinNoneToItsTolerance() {
        ProbabilityBest a = new AllocationEngine(EngineVersion.V1_4).evaluate(CLEAR, BERNOULLI, 5L).probabilityBest();
        ProbabilityBest b = new AllocationEngine(EngineVersion.V1_5).evaluate(CLEAR, BERNOULLI, 5L).probabilityBest();
        assertTrue(a.conditional()[0] && b.conditional()[0], "arm a wins no draw in either");
        for (int i = 0; i < a.alpha().length; i++) {
            // Integrated in both: within TolerancePeakQuadratureTest's tolerance. Counted: other draws (1.5 draws
            // each arm from its own stream), so within 5 standard errors of the difference (normal approximation).
            double allowed = a.conditional()[i] && b.conditional()[i] ? 2e-8 * a.alpha()[i] + 1e-15
                    : 5 * Math.hypot(a.standardError()[i], b.standardError()[i]);
            assertEquals(a.alpha()[i], b.alpha()[i], allowed, "arm " + i);
        }
    }

    @Test
    void version16DrawsAs15AndIntegratesTheArmsThatWinNoneToItsTolerance() {
        ProbabilityBest a = new AllocationEngine(EngineVersion.V1_5).evaluate(CLEAR, BERNOULLI, 5L).probabilityBest();
        ProbabilityBest b = new AllocationEngine(EngineVersion.V1_6).evaluate(CLEAR, BERNOULLI, 5L).probabilityBest();
        assertTrue(b.conditional()[0], "arm a wins no draw");
        assertEquals(a.draws(), b.draws());
        for (int i = 0; i < a.alpha().length; i++) {
            // Same draws, so the same counted alphas; integrated ones within SweptPeakQuadratureTest's tolerance
            // of 1.2's integration, as 1.5's are.
            assertEquals(a.conditional()[i], b.conditional()[i], "arm " + i);
            assertEquals(a.alpha()[i], b.alpha()[i], 2e-8 * a.alpha()[i] + 1e-15, "arm " + i);
        }
    }

    @Test
    void theEvaluationTellsThePolicyWhatItReadsFromTheAlphas() {
        List<Posterior> posteriors = posteriors(CLEAR);
        AlphaReaders thompson = AllocationEngine.readers(BERNOULLI, posteriors);
        assertEquals(1, thompson.orderedRanks());
        double[] alpha = {0.2, 0.5, 0.3};
        assertEquals(List.of(AllocationMethod.TOP_TWO_THOMPSON.weights(posteriors, alpha, 0.5)[1]),
                List.of(thompson.weights().apply(alpha)[1]));
        assertNull(thompson.threshold());
        AlphaReaders probability = AllocationEngine.readers(BERNOULLI.withRule(AllocationMethod.TOP_TWO_PROBABILITY),
                posteriors);
        assertEquals(2, probability.orderedRanks());
        assertNull(probability.weights());
        assertNull(AllocationEngine.readers(BERNOULLI.withRule(AllocationMethod.UNIFORM), posteriors).weights());
        assertTrue(AllocationEngine.readers(BERNOULLI.withRule(AllocationMethod.TOP_TWO_ADAPTIVE), posteriors)
                .weights() != null);
        LeaderThreshold threshold = new LeaderThreshold(0.95, 3);
        assertEquals(threshold, AllocationEngine.readers(BERNOULLI.withLeaderThreshold(threshold), posteriors)
                .threshold());
        assertEquals(threshold, BERNOULLI.withLeaderThreshold(threshold).withDraws(7).withBeta(0.4).leaderThreshold());
    }
}
