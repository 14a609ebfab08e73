package dev.runoff.audit;

import java.util.ArrayList;
import java.util.Comparator;
import java.util.List;

/**
 * Holm's step-down procedure (S. Holm, "A simple sequentially rejective multiple test procedure",
 * Scandinavian Journal of Statistics 6, 1979, 65-70): of {@code m} hypotheses, sort the p-values ascending and
 * reject the {@code i}-th smallest (1-based) while it stays below {@code alpha / (m - i + 1)}; the first that
 * does not, and every larger one, are kept. The chance of rejecting any true hypothesis is then at most
 * {@code alpha}, whatever the dependence between the tests (strong control of the family-wise error rate).
 *
 * <p>The audit tests every period of an experiment; at a per-period level {@code alpha} an honest experiment
 * with {@code m} tested periods would be flagged with probability up to {@code m * alpha}. Holm's procedure makes
 * {@code alpha} the level of the verdict on the whole experiment, and is never less powerful than dividing
 * {@code alpha} by {@code m} (Bonferroni).
 */
final class Holm {

    private Holm() {
    }

    /**
     * What the procedure decides.
     *
     * @param rejected which p-values are rejected
     * @param levels   the level each p-value is compared with in the step-down order: {@code alpha / (m - r)}
     *                 for the p-value of 0-based rank {@code r} (ties ranked by position)
     */
    record Result(boolean[] rejected, double[] levels) {
    }

    /**
     * Holm's procedure at family-wise level {@code alpha}.
     *
     * @throws IllegalArgumentException when a p-value is NaN
     */
    static Result test(double[] pValues, double alpha) {
        int m = pValues.length;
        List<Integer> order = new ArrayList<>(m);
        for (int i = 0; i < m; i++) {
            if (Double.isNaN(pValues[i])) {
                throw new IllegalArgumentException("p-value " + i + " is NaN");
            }
            order.add(i);
        }
        order.sort(Comparator.comparingDouble(i -> pValues[i]));
        boolean[] rejected = new boolean[m];
        double[] levels = new double[m];
        boolean stopped = false;
        for (int rank = 0; rank < m; rank++) {
            int i = order.get(rank);
            levels[i] = alpha / (m - rank);
            stopped = stopped || !(pValues[i] < levels[i]);
            rejected[i] = !stopped;
        }
        return new Result(rejected, levels);
    }

    /** Which of {@code pValues} {@link #test} rejects. */
    static boolean[] rejected(double[] pValues, double alpha) {
        return test(pValues, alpha).rejected();
    }
}
