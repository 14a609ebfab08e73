package dev.runoff.audit;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;

import java.util.SplittableRandom;
import org.junit.jupiter.api.Test;

class HolmTest {

    @Test
    void rejectsAsInThePublishedWorkedExample() {
        // Worked example of the Wikipedia article "Holm-Bonferroni method" (section Procedure, Example): four
        // hypotheses at alpha 0.05 with p-values 0.01, 0.04, 0.03, 0.005; hypotheses one and four are rejected.
        boolean[] rejected = Holm.rejected(new double[] {0.01, 0.04, 0.03, 0.005}, 0.05);
        assertArrayEquals(new boolean[] {true, false, false, true}, rejected);
    }

    @Test
    void stopsAtTheFirstPValueAboveItsLevelEvenIfALaterOneIsBelowItsOwn() {
        // 0.026 >= 0.05/2 stops the procedure; 0.04 < 0.05/1 is kept all the same (step-down, Holm 1979).
        assertArrayEquals(new boolean[] {false, false}, Holm.rejected(new double[] {0.04, 0.026}, 0.05));
        assertArrayEquals(new boolean[] {true, true}, Holm.rejected(new double[] {0.04, 0.02}, 0.05));
    }

    @Test
    void oneHypothesisIsThePlainTest() {
        assertArrayEquals(new boolean[] {true}, Holm.rejected(new double[] {0.0009}, 0.001));
        assertArrayEquals(new boolean[] {false}, Holm.rejected(new double[] {0.001}, 0.001));
    }

    @Test
    void keepsTheFamilyWiseErrorAtAlphaForIndependentTruePValues() {
        // Seeded: 40,000 families of 25 uniform p-values (every hypothesis true). Holm's bound: P(any rejection)
        // <= alpha = 0.05; for independent tests it is 1 - (1 - 0.05/25)^25 = 0.0488 (the smallest p-value
        // decides). Per-test level 0.05 would reject in 1 - 0.95^25 = 72% of families.
        SplittableRandom random = new SplittableRandom(20261202L);
        int families = 40_000;
        int any = 0;
        for (int f = 0; f < families; f++) {
            double[] p = new double[25];
            for (int i = 0; i < p.length; i++) {
                p[i] = random.nextDouble();
            }
            for (boolean r : Holm.rejected(p, 0.05)) {
                if (r) {
                    any++;
                    break;
                }
            }
        }
        double rate = any / (double) families;
        // Expected 0.0488; binomial standard error sqrt(0.0488 * 0.9512 / 40000) = 0.0011; 4 standard errors.
        assertEquals(0.0488, rate, 0.0044, "family-wise rejection rate " + rate);
    }

    @Test
    void levelsStepUpFromAlphaOverMToAlpha() {
        // Holm 1979: the i-th smallest of m p-values (1-based) is compared with alpha / (m - i + 1).
        assertArrayEquals(new double[] {0.05 / 3, 0.05, 0.05 / 2},
                Holm.test(new double[] {0.001, 0.9, 0.2}, 0.05).levels(), 1e-15);
    }

    @Test
    void aNaNPValueIsRefusedByIndex() {
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class,
                () -> Holm.rejected(new double[] {0.1, Double.NaN}, 0.05));
        assertEquals("p-value 1 is NaN", e.getMessage());
    }
}
