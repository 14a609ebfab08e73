package dev.runoff.client;

import static dev.runoff.client.ControlRecords.NOW;
import static dev.runoff.client.ControlRecords.avro;
import static dev.runoff.client.ControlRecords.running;
import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.runoff.records.avro.AllocationUpdate;
import java.util.ArrayList;
import java.util.List;
import java.util.Locale;
import java.util.SplittableRandom;
import org.junit.jupiter.api.Test;

/**
 * Sticky hashed assignment across weight changes, over 100,000 unit keys: which units move, how many, and
 * that every table fed the same records (or only the latest one) picks the same arms.
 *
 * <p>A unit moves between two weight vectors w and w' independently of the others (its clocks come from its
 * own hash), with probability {@code 1 - J_P(w, w')} (Moulton and Jiang 2018, "Maximally Consistent Sampling
 * and the Jaccard Index of Probability Distributions", the collision probability of their P-MinHash, which is
 * this race). So the moved share of N units is binomial: the checks allow 4.5 standard deviations
 * {@code sqrt(p (1 - p) / N)} plus 1e-5 (a correct implementation fails one check with probability below
 * 1e-5; the keys are fixed, so a pass is reproducible).
 */
class StickyAssignmentTest {
    private static final int UNITS = 100_000;
    private static final String[] ARMS = {"a", "b", "c", "d", "e"};

    private final MutableClock clock = new MutableClock(NOW);
    private long sequence;

    @Test
    void movedShareIsOneMinusTheProbabilityJaccardBetweenTheVariationDistanceAndTwiceIt() {
        SplittableRandom random = new SplittableRandom(11);
        for (int change = 0; change < 24; change++) {
            int arms = 2 + change % 4;
            double[] before = randomWeights(random, arms);
            double[] after = perturbed(random, before, change % 3 == 0 ? 0.3 : 0.05);
            double moved = movedShare(before, after);
            double expected = 1 - probabilityJaccard(before, after);
            double tv = totalVariation(before, after);
            double slack = slack(expected);
            System.out.printf(Locale.ROOT, "arms %d  TV %.4f  1-J_P %.4f  moved %.4f  2TV/(1+TV) %.4f%n",
                    arms, tv, expected, moved, 2 * tv / (1 + tv));
            assertTrue(Math.abs(moved - expected) <= slack, "moved " + moved + ", 1 - J_P " + expected);
            // J_P >= J_W = (1 - TV) / (1 + TV) for probability vectors, and no coupling moves less than TV
            assertTrue(moved >= tv - slack && moved <= 2 * tv / (1 + tv) + slack, "moved " + moved + ", TV " + tv);
        }
    }

    @Test
    void twoArmsMoveExactlyTheVariationDistanceAndOnlyFromTheArmThatLost() {
        double[][] changes = {{0.5, 0.5, 0.6, 0.4}, {0.9, 0.1, 0.5, 0.5}, {0.2, 0.8, 0.21, 0.79}};
        for (double[] change : changes) {
            double[] before = {change[0], change[1]};
            double[] after = {change[2], change[3]};
            String[] first = picks(table(before));
            String[] second = picks(table(after));
            String loser = after[0] < before[0] ? "a" : "b";
            int moved = 0;
            for (int i = 0; i < UNITS; i++) {
                if (!first[i].equals(second[i])) {
                    moved++;
                    assertEquals(loser, first[i], "unit " + i + " left an arm that gained");
                }
            }
            double tv = totalVariation(before, after);
            double share = moved / (double) UNITS;
            assertTrue(Math.abs(share - tv) <= slack(tv), "moved " + share + ", TV " + tv);
        }
    }

    @Test
    void aUnitMovesOnlyToAnArmThatGrewRelativelyMoreThanItsOwn() {
        SplittableRandom random = new SplittableRandom(5);
        for (int change = 0; change < 12; change++) {
            double[] before = randomWeights(random, 2 + change % 4);
            double[] after = perturbed(random, before, 0.2);
            String[] first = picks(table(before));
            String[] second = picks(table(after));
            int moved = 0;
            for (int i = 0; i < UNITS; i++) {
                int from = index(first[i]);
                int to = index(second[i]);
                if (from != to) {
                    moved++;
                    assertTrue(after[to] / before[to] > after[from] / before[from],
                            "unit " + i + " moved from " + first[i] + " to " + second[i]);
                }
            }
            assertTrue(moved > 0, "a change that moved nobody tests nothing");
        }
    }

    @Test
    void switchedOffArmMovesItsUnitsOnceAndNoOtherUnit() {
        String[] first = picks(table(new double[] {0.4, 0.3, 0.2, 0.1}));
        AllocationTable table = table(new double[] {0.4 / 0.7, 0.0, 0.2 / 0.7, 0.1 / 0.7});
        String[] off = picks(table);
        for (int i = 0; i < UNITS; i++) {
            assertEquals(first[i].equals("b"), !first[i].equals(off[i]), "unit " + i + " on " + first[i]);
        }
        // heartbeats and later records with the arm still off move nobody again
        apply(table, new double[] {0.4 / 0.7, 0.0, 0.2 / 0.7, 0.1 / 0.7});
        assertArrayEquals(off, picks(table));
    }

    @Test
    void tinyWeightChangeMovesAlmostNoUnit() {
        long moved = Math.round(movedShare(new double[] {0.5, 0.5}, new double[] {0.5000001, 0.4999999}) * UNITS);
        // expected moves: TV x units = 1e-7 x 100,000 = 0.01 (the old salted hash moved about half)
        assertTrue(moved <= 1, moved + " units moved");
    }

    @Test
    void tablesFedTheSameRecordsAndAFreshTableFedOnlyTheLatestPickTheSame() {
        SplittableRandom random = new SplittableRandom(3);
        AllocationTable first = AllocationTable.create(PickPolicy.builder("fallback").build(), clock);
        AllocationTable second = AllocationTable.create(PickPolicy.builder("fallback").build(), clock);
        double[] weights = randomWeights(random, 4);
        List<double[]> history = new ArrayList<>();
        for (int period = 0; period < 30; period++) {
            weights = perturbed(random, weights, 0.1);
            history.add(weights);
            byte[] record = avro(record(weights));
            first.apply("e", record);
            second.apply("e", record);
            assertArrayEquals(picks(first, 5_000), picks(second, 5_000), "after record " + period);
        }
        AllocationTable fresh = table(weights);
        assertArrayEquals(picks(first), picks(fresh));
        // weights that come back bring every unit back to the arm it had under them
        apply(first, history.get(0));
        assertArrayEquals(picks(table(history.get(0))), picks(first));
    }

    @Test
    void pinnedArmsNeverChange() {
        // Arms produced by this implementation when the race was introduced (first letters, units user-0 ..
        // user-23). Every replica and release must agree on them: if this fails, units would change arm.
        AllocationTable table = AllocationTable.create(PickPolicy.builder("fallback").build(), clock);
        table.apply("checkout-button", avro(running("checkout-button", 1, "control", 0.4, "green", 0.3,
                "blue", 0.2, "red", 0.1)));
        StringBuilder arms = new StringBuilder();
        for (int i = 0; i < 24; i++) {
            arms.append(table.pick("checkout-button", "user-" + i).charAt(0));
        }
        assertEquals("rbbccrgrcbbgcgbcbcgcbcgc", arms.toString());
    }

    /** Moulton and Jiang's J_P(x, y) = sum over i in both supports of 1 / sum_j max(x_j / x_i, y_j / y_i). */
    private static double probabilityJaccard(double[] x, double[] y) {
        double sum = 0;
        for (int i = 0; i < x.length; i++) {
            if (x[i] > 0 && y[i] > 0) {
                double denominator = 0;
                for (int j = 0; j < x.length; j++) {
                    denominator += Math.max(x[j] / x[i], y[j] / y[i]);
                }
                sum += 1 / denominator;
            }
        }
        return sum;
    }

    /** sum(max(0, w_i - w'_i)), half the L1 distance. */
    private static double totalVariation(double[] x, double[] y) {
        double sum = 0;
        for (int i = 0; i < x.length; i++) {
            sum += Math.max(0, x[i] - y[i]);
        }
        return sum;
    }

    private static double slack(double p) {
        return 4.5 * Math.sqrt(p * (1 - p) / UNITS) + 1e-5;
    }

    private double movedShare(double[] before, double[] after) {
        String[] first = picks(table(before));
        String[] second = picks(table(after));
        int moved = 0;
        for (int i = 0; i < UNITS; i++) {
            moved += first[i].equals(second[i]) ? 0 : 1;
        }
        return moved / (double) UNITS;
    }

    /** Weights in [0.05, 1] normalised: every arm keeps some weight. */
    private static double[] randomWeights(SplittableRandom random, int arms) {
        double[] weights = new double[arms];
        for (int i = 0; i < arms; i++) {
            weights[i] = 0.05 + random.nextDouble() * 0.95;
        }
        return normalised(weights);
    }

    /** (1 - step) w + step v for a fresh random v: a change of total variation at most {@code step}. */
    private static double[] perturbed(SplittableRandom random, double[] weights, double step) {
        double[] target = randomWeights(random, weights.length);
        double[] mixed = new double[weights.length];
        for (int i = 0; i < weights.length; i++) {
            mixed[i] = (1 - step) * weights[i] + step * target[i];
        }
        return normalised(mixed);
    }

    private static double[] normalised(double[] weights) {
        double sum = 0;
        for (double w : weights) {
            sum += w;
        }
        double[] result = new double[weights.length];
        for (int i = 0; i < weights.length; i++) {
            result[i] = weights[i] / sum;
        }
        return result;
    }

    private AllocationTable table(double[] weights) {
        AllocationTable table = AllocationTable.create(PickPolicy.builder("fallback").build(), clock);
        apply(table, weights);
        return table;
    }

    private void apply(AllocationTable table, double[] weights) {
        assertEquals(ControlRecordOutcome.APPLIED, table.apply("e", avro(record(weights))));
    }

    private AllocationUpdate record(double[] weights) {
        Object[] armsAndWeights = new Object[2 * weights.length];
        for (int i = 0; i < weights.length; i++) {
            armsAndWeights[2 * i] = ARMS[i];
            armsAndWeights[2 * i + 1] = weights[i];
        }
        return running("e", ++sequence, armsAndWeights);
    }

    private static int index(String arm) {
        return arm.charAt(0) - 'a';
    }

    private static String[] picks(AllocationTable table) {
        return picks(table, UNITS);
    }

    private static String[] picks(AllocationTable table, int n) {
        String[] arms = new String[n];
        for (int i = 0; i < n; i++) {
            arms[i] = table.pick("e", "unit-" + i);
        }
        return arms;
    }
}
