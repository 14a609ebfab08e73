package dev.runoff.engine.allocation;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.List;
import java.util.Set;
import org.apache.commons.rng.UniformRandomProvider;
import org.apache.commons.rng.simple.RandomSource;
import org.junit.jupiter.api.Test;

/** Each guard's effect, hand-computed from the rules documented on {@link Guards}, and their combination. */
class GuardsTest {
    private static final List<String> ARMS = List.of("a", "b", "c");
    private static final long[] ENOUGH = {1000, 1000, 1000};

    @Test
    void noGuardsKeepTheRuleWeights() {
        GuardedWeights g = Guards.NONE.apply(new double[] {0.6, 0.3, 0.1}, ARMS, ENOUGH, null);
        assertArrayEquals(new double[] {0.6, 0.3, 0.1}, g.weights(), 1e-15);
        assertEquals(Set.of(), g.flags());
    }

    @Test
    void warmUpGivesEqualWeightsUntilEveryArmHasEnoughTrials() {
        Guards guards = Guards.NONE.withWarmUp(100);
        GuardedWeights during = guards.apply(new double[] {0.6, 0.3, 0.1}, ARMS, new long[] {500, 99, 500}, null);
        assertArrayEquals(new double[] {1.0 / 3, 1.0 / 3, 1.0 / 3}, during.weights(), 1e-15);
        assertEquals(Set.of(GuardFlag.WARM_UP), during.flags());
        GuardedWeights after = guards.apply(new double[] {0.6, 0.3, 0.1}, ARMS, new long[] {500, 100, 500}, null);
        assertArrayEquals(new double[] {0.6, 0.3, 0.1}, after.weights(), 1e-15);
        assertEquals(Set.of(), after.flags());
    }

    @Test
    void floorRaisesSmallWeightsAndScalesTheOthersByOneFactor() {
        // 0.02 is pinned to 0.05; the others share 0.95 in their ratio 0.9 : 0.08.
        GuardedWeights g = Guards.NONE.withFloor(0.05).apply(new double[] {0.9, 0.08, 0.02}, ARMS, ENOUGH, null);
        assertArrayEquals(new double[] {0.9 * 0.95 / 0.98, 0.08 * 0.95 / 0.98, 0.05}, g.weights(), 1e-15);
        assertEquals(Set.of(GuardFlag.FLOOR), g.flags());
    }

    @Test
    void floorPinsArmsThatFallBelowItOnlyAfterOthersArePinned() {
        // First pass pins the zero weight (scale 0.9); then 0.9 * 0.1 = 0.09 < 0.1 pins the second arm too,
        // leaving 0.8 for the first.
        GuardedWeights g = Guards.NONE.withFloor(0.1).apply(new double[] {0.9, 0.1, 0.0}, ARMS, ENOUGH, null);
        assertArrayEquals(new double[] {0.8, 0.1, 0.1}, g.weights(), 1e-15);
    }

    @Test
    void floorThatBindsNothingChangesNothing() {
        GuardedWeights g = Guards.NONE.withFloor(0.1).apply(new double[] {0.5, 0.3, 0.2}, ARMS, ENOUGH, null);
        assertArrayEquals(new double[] {0.5, 0.3, 0.2}, g.weights(), 1e-15);
        assertEquals(Set.of(), g.flags());
    }

    @Test
    void floorOfOneOverKGivesEqualWeights() {
        GuardedWeights g = Guards.NONE.withFloor(0.25).apply(new double[] {0.7, 0.1, 0.1, 0.1},
                List.of("a", "b", "c", "d"), new long[4], null);
        assertArrayEquals(new double[] {0.25, 0.25, 0.25, 0.25}, g.weights(), 1e-15);
    }

    @Test
    void controlGetsExactlyItsShareAndOthersShareTheRestInProportion() {
        GuardedWeights g = Guards.NONE.withControl("c", 0.25).apply(new double[] {0.5, 0.3, 0.2}, ARMS, ENOUGH, null);
        assertArrayEquals(new double[] {0.75 * 0.5 / 0.8, 0.75 * 0.3 / 0.8, 0.25}, g.weights(), 1e-15);
        assertEquals(Set.of(GuardFlag.CONTROL_SHARE), g.flags());
    }

    @Test
    void controlShareSplitsTheRestEquallyWhenTheRuleGaveOthersNothing() {
        GuardedWeights g = Guards.NONE.withControl("a", 0.4).apply(new double[] {1, 0, 0}, ARMS, ENOUGH, null);
        assertArrayEquals(new double[] {0.4, 0.3, 0.3}, g.weights(), 1e-15);
    }

    @Test
    void capMovesAtMostMaxChangeAlongTheSegmentToTheTarget() {
        double third = 1.0 / 3;
        double[] previous = {third, third, third};
        GuardedWeights g = Guards.NONE.withMaxChange(0.1).apply(new double[] {0.8, 0.1, 0.1}, ARMS, ENOUGH, previous);
        double lambda = 0.1 / (0.8 - third);
        assertArrayEquals(new double[] {third + lambda * (0.8 - third), third + lambda * (0.1 - third),
            third + lambda * (0.1 - third)}, g.weights(), 1e-15);
        assertEquals(0.1, g.weights()[0] - third, 1e-15);
        assertEquals(Set.of(GuardFlag.CAP), g.flags());
    }

    @Test
    void capThatDoesNotBindChangesNothingAndNeedsPreviousWeights() {
        double[] target = {0.4, 0.35, 0.25};
        Guards guards = Guards.NONE.withMaxChange(0.1);
        assertArrayEquals(target, guards.apply(target, ARMS, ENOUGH, new double[] {0.35, 0.35, 0.3}).weights(), 1e-15);
        assertArrayEquals(target, guards.apply(target, ARMS, ENOUGH, null).weights(), 1e-15);
    }

    @Test
    void allGuardsTogetherApplyInTheDocumentedOrder() {
        // warm-up -> equal (1/3 each); control 'a' 0.2 -> (0.2, 0.4, 0.4); floor 0.1 binds nothing;
        // cap 0.05 from previous (0.2, 0.7, 0.1) (already guarded): largest move 0.3, lambda 1/6.
        Guards guards = new Guards(50, 0.1, new Guards.ControlShare("a", 0.2), 0.05);
        GuardedWeights g = guards.apply(new double[] {0.1, 0.1, 0.8}, ARMS, new long[] {10, 60, 60},
                new double[] {0.2, 0.7, 0.1});
        double lambda = 0.05 / 0.3;
        assertArrayEquals(new double[] {0.2, 0.7 + lambda * (0.4 - 0.7), 0.1 + lambda * (0.4 - 0.1)}, g.weights(),
                1e-15);
        assertEquals(Set.of(GuardFlag.WARM_UP, GuardFlag.CONTROL_SHARE, GuardFlag.CAP), g.flags());
    }

    @Test
    void combinedGuardsKeepEveryInvariantOnRandomInputs() {
        UniformRandomProvider rng = RandomSource.XO_SHI_RO_256_PP.create(77L);
        for (int trial = 0; trial < 2000; trial++) {
            int k = 2 + rng.nextInt(10);
            List<String> arms = names(k);
            double floor = rng.nextDouble() / (2 * k);
            int control = rng.nextInt(k);
            double share = floor + rng.nextDouble() * (1 - floor * k);
            double cap = 0.01 + 0.99 * rng.nextDouble();
            Guards guards = new Guards(10, floor, new Guards.ControlShare(arms.get(control), share), cap);
            double[] previous = randomDistribution(rng, k);
            double[] w = guards.apply(randomDistribution(rng, k), arms, randomTrials(rng, k), previous).weights();
            double[] guardedPrevious = guards.withWarmUp(0).withMaxChange(1).apply(previous, arms, new long[k], null)
                    .weights();
            assertEquals(1.0, Weights.sum(w), 1e-12);
            assertEquals(share, w[control], 1e-12, "control share");
            for (int i = 0; i < k; i++) {
                assertTrue(w[i] >= floor - 1e-12, "floor " + floor + " at arm " + i + ": " + w[i]);
                assertTrue(Math.abs(w[i] - guardedPrevious[i]) <= cap + 1e-12, "cap " + cap + " at arm " + i);
            }
        }
    }

    @Test
    void badGuardValuesAreRejectedWithMessages() {
        assertMessage("warm-up trials must be >= 0, got -1", () -> Guards.NONE.withWarmUp(-1));
        assertMessage("floor must be in [0.0, 1.0], got NaN", () -> Guards.NONE.withFloor(Double.NaN));
        assertMessage("floor must be in [0.0, 1.0], got 1.5", () -> Guards.NONE.withFloor(1.5));
        assertMessage("max change must be in (0, 1], got 0.0", () -> Guards.NONE.withMaxChange(0));
        assertMessage("max change must be in (0, 1], got 1.2", () -> Guards.NONE.withMaxChange(1.2));
        assertMessage("control share must be in [0.0, 1.0], got 1.5", () -> Guards.NONE.withControl("a", 1.5));
        assertMessage("control arm name must not be blank", () -> Guards.NONE.withControl(" ", 0.5));
        assertMessage("control share (0.05) must not be below the floor (0.1)",
                () -> Guards.NONE.withFloor(0.1).withControl("a", 0.05));
    }

    @Test
    void guardsThatCannotBeMetWithTheArmsAreRejectedWithMessages() {
        double[] w = {0.25, 0.25, 0.25, 0.25};
        List<String> four = names(4);
        assertMessage("floor 0.3 times 4 arms = 1.2 exceeds 1",
                () -> Guards.NONE.withFloor(0.3).apply(w, four, new long[4], null));
        assertMessage("control share 0.5 plus floor 0.2 for each of the other 3 arms exceeds 1",
                () -> Guards.NONE.withFloor(0.2).withControl("a0", 0.5).apply(w, four, new long[4], null));
        assertMessage("control arm 'z' is not one of the arms [a0, a1, a2, a3]",
                () -> Guards.NONE.withControl("z", 0.5).apply(w, four, new long[4], null));
        assertMessage("previous weights must sum to 1 (within 1.0E-9), got 0.9",
                () -> Guards.NONE.apply(w, four, new long[4], new double[] {0.3, 0.3, 0.2, 0.1}));
        assertMessage("previous weights[2] must be finite and >= 0, got -0.1",
                () -> Guards.NONE.apply(w, four, new long[4], new double[] {0.5, 0.3, -0.1, 0.3}));
        assertMessage("previous weights must have 4 entries, got 2",
                () -> Guards.NONE.apply(w, four, new long[4], new double[] {0.5, 0.5}));
    }

    private static void assertMessage(String expected, Runnable call) {
        assertEquals(expected, assertThrows(IllegalArgumentException.class, call::run).getMessage());
    }

    private static List<String> names(int k) {
        return java.util.stream.IntStream.range(0, k).mapToObj(i -> "a" + i).toList();
    }

    private static double[] randomDistribution(UniformRandomProvider rng, int k) {
        double[] w = new double[k];
        for (int i = 0; i < k; i++) {
            w[i] = rng.nextDouble() < 0.3 ? 0 : rng.nextDouble();
        }
        w[rng.nextInt(k)] += 0.01;
        return Weights.normalised(w);
    }

    private static long[] randomTrials(UniformRandomProvider rng, int k) {
        long[] t = new long[k];
        for (int i = 0; i < k; i++) {
            t[i] = rng.nextInt(30);
        }
        return t;
    }
}
