package dev.runoff.engine.posterior;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;

import java.math.BigInteger;
import java.util.SplittableRandom;
import org.junit.jupiter.api.Test;

/**
 * The alias table gives each piece the probability its weight asks for: the slot entries are read back
 * into per-piece probabilities, in exact integer arithmetic (Walker 1977: piece k's probability is the sum
 * over slots of {@code threshold / capacity} where the slot is k, plus {@code 1 - threshold / capacity}
 * where k is the slot's alias, each divided by the number of slots).
 */
class AliasTableTest {
    private static final int SLOTS = 512;

    @Test
    void slotEntriesReproduceTheWeights() {
        SplittableRandom random = new SplittableRandom(99);
        double[] weights = new double[400];
        for (int k = 0; k < weights.length; k++) {
            weights[k] = k % 7 == 0 ? 0 : random.nextDouble() * Math.pow(10, -random.nextInt(12));
        }
        long[] entries = AliasTable.build(weights, SLOTS);
        BigInteger[] mass = new BigInteger[SLOTS];
        java.util.Arrays.fill(mass, BigInteger.ZERO);
        BigInteger capacity = BigInteger.valueOf(AliasTable.CAPACITY);
        for (int j = 0; j < SLOTS; j++) {
            long threshold = entries[j] & ((1L << AliasTable.ALIAS_SHIFT) - 1);
            int alias = (int) (entries[j] >>> AliasTable.ALIAS_SHIFT);
            mass[j] = mass[j].add(BigInteger.valueOf(threshold));
            mass[alias] = mass[alias].add(capacity.subtract(BigInteger.valueOf(threshold)));
        }
        double total = java.util.Arrays.stream(weights).sum();
        double scale = SLOTS * (double) AliasTable.CAPACITY;
        for (int k = 0; k < SLOTS; k++) {
            double expected = k < weights.length ? weights[k] / total : 0;
            double share = mass[k].doubleValue() / scale;
            // rounding each weight to a multiple of 2^-62 of the total, the remainder to the largest piece
            assertEquals(expected, share, 1e-15 + 1e-13 * expected, "probability of piece " + k);
            if (expected == 0) {
                assertEquals(0.0, share, "a piece of weight 0 is never chosen: " + k);
            }
        }
    }

    @Test
    void badWeightsAreRejectedWithTheirIndex() {
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class,
                () -> AliasTable.build(new double[] {1, Double.NaN}, 4));
        assertEquals("alias weight 1 must be finite and >= 0, got NaN", e.getMessage());
        assertThrows(IllegalArgumentException.class, () -> AliasTable.build(new double[] {0, 0}, 4));
        assertThrows(IllegalArgumentException.class, () -> AliasTable.build(new double[5], 4));
    }
}
