package dev.runoff.client;

import java.util.List;
import java.util.function.IntFunction;
import org.apache.commons.math3.stat.inference.ChiSquareTest;

/** Tallies of picked arms and Pearson's chi-square goodness-of-fit test on them. */
final class ArmCounts {

    /**
     * Significance level of every goodness-of-fit test in these tests: a correct implementation fails one
     * such check with probability 0.001 (for hashed picks the keys are fixed, so a pass is reproducible).
     */
    static final double ALPHA = 0.001;

    private ArmCounts() {
    }

    /** How often each of {@code arms} came out of {@code picks} for i = 0 .. n-1; other answers fail. */
    static long[] tally(List<String> arms, int n, IntFunction<String> picks) {
        long[] counts = new long[arms.size()];
        for (int i = 0; i < n; i++) {
            String arm = picks.apply(i);
            int index = arms.indexOf(arm);
            if (index < 0) {
                throw new AssertionError("pick " + i + " returned '" + arm + "', not one of " + arms);
            }
            counts[index]++;
        }
        return counts;
    }

    /**
     * p-value of Pearson's chi-square test of {@code observed} against {@code weights} (all > 0), computed by
     * Apache Commons Math's {@link ChiSquareTest#chiSquareTest(double[], long[])}.
     */
    static double pValue(double[] weights, long[] observed) {
        return new ChiSquareTest().chiSquareTest(weights, observed);
    }
}
