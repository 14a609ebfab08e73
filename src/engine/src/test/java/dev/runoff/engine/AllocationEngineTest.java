package dev.runoff.engine;

import dev.runoff.engine.core.Arm;

import dev.runoff.engine.core.Metric;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertNotEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.runoff.engine.allocation.AllocationMethod;
import dev.runoff.engine.allocation.GuardFlag;
import dev.runoff.engine.allocation.Guards;
import dev.runoff.engine.best.ProbabilityBest;
import dev.runoff.engine.posterior.BetaPosterior;
import dev.runoff.engine.posterior.NormalGammaPrior;
import dev.runoff.engine.stats.BernoulliStats;
import dev.runoff.engine.stats.ValueStats;
import java.util.ArrayList;
import java.util.List;
import java.util.Set;
import org.apache.commons.math3.distribution.BetaDistribution;
import org.junit.jupiter.api.Test;

/** The engine facade: composition, method choice, determinism and input checks. */
class AllocationEngineTest {
    private static final EngineConfig BERNOULLI = EngineConfig.defaults(Metric.BERNOULLI);
    private static final AllocationEngine ENGINE = new AllocationEngine();

    private static List<Arm> threeArms() {
        return List.of(bernoulli("a", 120, 1000), bernoulli("b", 135, 1000), bernoulli("c", 110, 1000));
    }

    private static Arm bernoulli(String name, long successes, long trials) {
        return new Arm(name, new BernoulliStats(trials, successes));
    }

    @Test
    void weightsAloneEqualTheEvaluationsWeightsForRulesThatDoNotReadAlpha() {
        List<Arm> arms = List.of(bernoulli("a", 40, 400), bernoulli("b", 52, 400), bernoulli("c", 20, 300));
        double[] previous = {0.3, 0.4, 0.3};
        for (AllocationMethod rule : List.of(AllocationMethod.UNIFORM, AllocationMethod.TOP_TWO_VALUE,
                AllocationMethod.TOP_TWO_EI)) {
            EngineConfig config = BERNOULLI.withRule(rule);
            assertArrayEquals(ENGINE.evaluate(arms, config, 7L, previous).weights(),
                    ENGINE.weights(arms, config, previous), rule.cliName());
        }
        EngineConfig thompson = BERNOULLI;
        assertTrue(thompson.rule().readsProbabilityBest());
        assertThrows(IllegalArgumentException.class, () -> ENGINE.weights(arms, thompson, previous));
    }

    @Test
    void evaluationReportsConjugatePosteriorsAndTheirIntervals() {
        Evaluation e = ENGINE.evaluate(threeArms(), BERNOULLI, 7L);
        assertEquals(List.of("a", "b", "c"), e.arms());
        Evaluation.PosteriorSummary a = e.posteriors().get(0);
        // Beta(1, 1) prior and 120 successes in 1000 trials give Beta(121, 881) (conjugacy, Gelman et al.,
        // "Bayesian Data Analysis", section 2.4); the interval is checked against Commons Math's Beta.
        assertEquals(new BetaPosterior(121, 881), a.posterior());
        assertEquals(121.0 / 1002, a.mean(), 1e-15);
        BetaDistribution reference = new BetaDistribution(121, 881);
        assertEquals(reference.inverseCumulativeProbability(0.025), a.lower95(), 1e-9);
        assertEquals(reference.inverseCumulativeProbability(0.975), a.upper95(), 1e-9);
        assertEquals(AllocationMethod.TOP_TWO_THOMPSON, e.rule());
        assertEquals(0.5, e.beta());
        assertEquals(7L, e.seed());
        assertEquals(AllocationEngine.VERSION, e.engineVersion());
    }

    @Test
    void weightsAreTheRulesWeightsWhenNoGuardIsSet() {
        Evaluation e = ENGINE.evaluate(threeArms(), BERNOULLI, 0L);
        assertArrayEquals(e.ruleWeights(), e.weights(), 1e-15);
        assertEquals(1.0, e.weights()[0] + e.weights()[1] + e.weights()[2], 1e-12);
        assertArrayEquals(AllocationMethod.TOP_TWO_THOMPSON.weights(List.of(), e.probabilityBest().alpha(), 0.5),
                e.ruleWeights(), 0.0);
        assertEquals(Set.of(), e.flags());
        assertFalse(e.warmUpActive());
    }

    @Test
    void autoIntegratesExactlyUpToTwelveArmsAndUsesMonteCarloBeyond() {
        assertEquals(ProbabilityBest.Method.EXACT, evaluateArms(12, EngineConfig.MethodChoice.AUTO).method());
        Evaluation thirteen = evaluateArms(13, EngineConfig.MethodChoice.AUTO);
        assertEquals(ProbabilityBest.Method.MONTE_CARLO, thirteen.method());
        assertEquals(2000, thirteen.probabilityBest().draws());
        assertEquals(ProbabilityBest.Method.MONTE_CARLO, evaluateArms(3, EngineConfig.MethodChoice.MONTE_CARLO).method());
        assertEquals(ProbabilityBest.Method.EXACT, evaluateArms(13, EngineConfig.MethodChoice.EXACT).method());
    }

    private static Evaluation evaluateArms(int k, EngineConfig.MethodChoice method) {
        List<Arm> arms = new ArrayList<>();
        for (int i = 0; i < k; i++) {
            arms.add(bernoulli("arm" + i, 50 + i, 500));
        }
        return ENGINE.evaluate(arms, BERNOULLI.withMethod(method).withDraws(2000), 3L);
    }

    @Test
    void repeatedEvaluationsAreBitIdentical() {
        for (EngineConfig.MethodChoice method : EngineConfig.MethodChoice.values()) {
            EngineConfig config = BERNOULLI.withMethod(method).withGuards(Guards.NONE.withFloor(0.05).withMaxChange(0.2));
            double[] previous = {0.2, 0.3, 0.5};
            Evaluation first = ENGINE.evaluate(threeArms(), config, 42L, previous);
            Evaluation second = new AllocationEngine().evaluate(threeArms(), config, 42L, previous.clone());
            assertEquals(first, second);
            for (int i = 0; i < 3; i++) {
                assertEquals(Double.doubleToRawLongBits(first.weight(i)), Double.doubleToRawLongBits(second.weight(i)));
                assertEquals(Double.doubleToRawLongBits(first.probabilityBest().alpha(i)),
                        Double.doubleToRawLongBits(second.probabilityBest().alpha(i)));
            }
        }
    }

    @Test
    void monteCarloDependsOnTheSeedAndAgreesWithExactIntegration() {
        EngineConfig mc = BERNOULLI.withMethod(EngineConfig.MethodChoice.MONTE_CARLO);
        Evaluation one = ENGINE.evaluate(threeArms(), mc, 1L);
        Evaluation two = ENGINE.evaluate(threeArms(), mc, 2L);
        assertNotEquals(one.probabilityBest(), two.probabilityBest());
        Evaluation exact = ENGINE.evaluate(threeArms(), BERNOULLI, 1L);
        for (int i = 0; i < 3; i++) {
            double se = one.probabilityBest().standardError(i);
            assertTrue(Math.abs(one.probabilityBest().alpha(i) - exact.probabilityBest().alpha(i)) <= 4 * se + 1e-12,
                    "arm " + i + " within 4 standard errors");
        }
    }

    @Test
    void guardsAreAppliedAfterTheRuleAndFlagged() {
        EngineConfig config = BERNOULLI.withGuards(Guards.NONE.withWarmUp(200).withControl("c", 0.4));
        List<Arm> arms = List.of(bernoulli("a", 12, 100), bernoulli("b", 40, 300), bernoulli("c", 30, 300));
        Evaluation e = ENGINE.evaluate(arms, config, 0L);
        assertTrue(e.warmUpActive());
        assertEquals(Set.of(GuardFlag.WARM_UP, GuardFlag.CONTROL_SHARE), e.flags());
        assertArrayEquals(new double[] {0.3, 0.3, 0.4}, e.weights(), 1e-15);
        assertNotEquals(e.ruleWeights()[2], e.weights()[2]);
    }

    @Test
    void previousWeightsCapTheMove() {
        EngineConfig config = BERNOULLI.withGuards(Guards.NONE.withMaxChange(0.05));
        double[] previous = {0.1, 0.1, 0.8};
        Evaluation e = ENGINE.evaluate(threeArms(), config, 0L, previous);
        assertEquals(Set.of(GuardFlag.CAP), e.flags());
        double largest = 0;
        for (int i = 0; i < 3; i++) {
            largest = Math.max(largest, Math.abs(e.weight(i) - previous[i]));
        }
        assertEquals(0.05, largest, 1e-12);
        assertEquals(1.0, e.weights()[0] + e.weights()[1] + e.weights()[2], 1e-12);
    }

    @Test
    void everyRuleRunsOnValueArms() {
        EngineConfig config = EngineConfig.defaults(Metric.VALUE).withBeta(0.6);
        List<Arm> arms = List.of(new Arm("a", ValueStats.ofSummary(400, 2.5, 4.0)),
                new Arm("b", ValueStats.ofSummary(400, 2.9, 4.2)), new Arm("c", ValueStats.ofSummary(300, 2.0, 3.0)));
        for (AllocationMethod rule : AllocationMethod.values()) {
            double[] w = ENGINE.evaluate(arms, config.withRule(rule), 0L).weights();
            assertEquals(1.0, w[0] + w[1] + w[2], 1e-12, rule.cliName());
            assertTrue(rule == AllocationMethod.UNIFORM || (w[1] > w[0] && w[1] > w[2]), rule.cliName() + " favours arm b");
        }
    }

    @Test
    void fewerThanTwoArmsAreRejected() {
        assertMessage("at least two arms are needed, got 1", () -> ENGINE.evaluate(List.of(bernoulli("a", 1, 2)),
                BERNOULLI, 0L));
    }

    @Test
    void duplicateNamesAreRejectedNamingTheDuplicate() {
        assertMessage("duplicate arm name 'b'", () -> ENGINE.evaluate(List.of(bernoulli("a", 1, 2), bernoulli("b", 1, 2),
                bernoulli("b", 2, 3)), BERNOULLI, 0L));
    }

    @Test
    void statisticsOfTheWrongKindAreRejectedNamingTheArm() {
        List<Arm> mixed = List.of(bernoulli("a", 1, 2), new Arm("v", ValueStats.ofSummary(10, 1.0, 1.0)));
        assertMessage("arm 'v' has value statistics but the prior is for the Bernoulli metric",
                () -> ENGINE.evaluate(mixed, BERNOULLI, 0L));
        assertMessage("arm 'a' has Bernoulli statistics but the prior is for the value metric",
                () -> ENGINE.evaluate(mixed, EngineConfig.defaults(Metric.VALUE), 0L));
    }

    @Test
    void impossibleStatisticsAreRejectedNamingTheArmAndValue() {
        assertMessage("arm 'a': trials must be >= 0, got -5", () -> bernoulli("a", 0, -5));
        assertMessage("arm 'a': successes must be >= 0, got -1", () -> bernoulli("a", -1, 5));
        assertMessage("arm 'b': successes (6) must not exceed trials (5)", () -> bernoulli("b", 6, 5));
        assertMessage("arm 'v': mean must be finite, got NaN", () -> new Arm("v", new ValueStats(3, Double.NaN, 1)));
        assertMessage("arm 'v': count must be >= 0, got -3", () -> new Arm("v", new ValueStats(-3, 1, 1)));
    }

    @Test
    void rulesThatNeedMeansRejectPosteriorsWithoutOne() {
        // With alpha0 = 0.2 and no data the Student-t marginal has 0.4 degrees of freedom: no mean.
        EngineConfig config = EngineConfig.defaults(Metric.VALUE).withPrior(new NormalGammaPrior(0, 1, 0.2, 1))
                .withRule(AllocationMethod.TOP_TWO_VALUE);
        List<Arm> arms = List.of(new Arm("a", ValueStats.EMPTY), new Arm("b", ValueStats.ofSummary(10, 1, 1)));
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class, () -> ENGINE.evaluate(arms, config, 0L));
        assertTrue(e.getMessage().startsWith("arm 'a': rule top-two-value needs a finite posterior mean, got NaN"),
                e.getMessage());
    }

    @Test
    void previousWeightsOfTheWrongShapeAreRejected() {
        assertMessage("previous weights must have 3 entries, got 2",
                () -> ENGINE.evaluate(threeArms(), BERNOULLI, 0L, new double[] {0.5, 0.5}));
    }

    private static void assertMessage(String expected, Runnable call) {
        assertEquals(expected, assertThrows(IllegalArgumentException.class, call::run).getMessage());
    }
}
