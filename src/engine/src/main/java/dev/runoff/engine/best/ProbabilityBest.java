package dev.runoff.engine.best;

import java.util.Arrays;

/**
 * For each arm i, {@code alpha_i = P(theta_i > max_{j != i} theta_j)} under the posterior, with the standard
 * error of the estimate (0 for exact integration).
 *
 * @param alpha         probability that each arm is best, in arm order
 * @param standardError standard error of each alpha, in arm order
 * @param method        how the values were computed
 * @param draws         Monte Carlo draws used (0 for exact integration)
 */
public record ProbabilityBest(double[] alpha, double[] standardError, Method method, int draws) {

    /** Copies the arrays so the value stays immutable. */
    public ProbabilityBest {
        if (alpha.length != standardError.length) {
            throw new IllegalArgumentException("alpha and standardError differ in length: "
                    + alpha.length + " vs " + standardError.length);
        }
        alpha = alpha.clone();
        standardError = standardError.clone();
    }

    /** Probability that arm {@code i} is best. */
    public double alpha(int i) {
        return alpha[i];
    }

    /** Standard error of {@link #alpha(int)}. */
    public double standardError(int i) {
        return standardError[i];
    }

    /** Number of arms. */
    public int size() {
        return alpha.length;
    }

    @Override
    public double[] alpha() {
        return alpha.clone();
    }

    @Override
    public double[] standardError() {
        return standardError.clone();
    }

    @Override
    public boolean equals(Object o) {
        return o instanceof ProbabilityBest p && method == p.method && draws == p.draws
                && Arrays.equals(alpha, p.alpha) && Arrays.equals(standardError, p.standardError);
    }

    @Override
    public int hashCode() {
        return 31 * Arrays.hashCode(alpha) + Arrays.hashCode(standardError) + method.hashCode() + draws;
    }

    @Override
    public String toString() {
        return "ProbabilityBest[" + method + ", draws=" + draws + ", alpha=" + Arrays.toString(alpha)
                + ", standardError=" + Arrays.toString(standardError) + "]";
    }

    /** How alpha was computed. */
    public enum Method {
        /** One-dimensional numerical integration in log space. */
        EXACT,
        /** Seeded joint posterior draws. */
        MONTE_CARLO
    }
}
