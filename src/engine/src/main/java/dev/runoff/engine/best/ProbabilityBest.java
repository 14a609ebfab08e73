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
 * @param conditional   per arm, whether its alpha is a conditional Monte Carlo estimate because it won none
 *                      of the {@code draws} joint draws ({@link AdaptiveMonteCarlo}); all false otherwise
 */
public record ProbabilityBest(double[] alpha, double[] standardError, Method method, int draws,
                              boolean[] conditional) {

    /** Copies the arrays so the value stays immutable. */
    public ProbabilityBest {
        if (alpha.length != standardError.length || alpha.length != conditional.length) {
            throw new IllegalArgumentException("alpha, standardError and conditional differ in length: "
                    + alpha.length + ", " + standardError.length + ", " + conditional.length);
        }
        alpha = alpha.clone();
        standardError = standardError.clone();
        conditional = conditional.clone();
    }

    /** An estimate without conditional arms. */
    public ProbabilityBest(double[] alpha, double[] standardError, Method method, int draws) {
        this(alpha, standardError, method, draws, new boolean[alpha.length]);
    }

    /** Whether arm {@code i} won no joint draw and its alpha is a conditional Monte Carlo estimate. */
    public boolean conditional(int i) {
        return conditional[i];
    }

    /**
     * The one-sided 95% Clopper-Pearson upper bound on alpha of an arm that won none of the draws
     * ({@link AdaptiveMonteCarlo#zeroWinUpperBound}), or NaN for an arm that won some or an exact estimate.
     */
    public double zeroWinUpperBound(int i) {
        return conditional[i] ? AdaptiveMonteCarlo.zeroWinUpperBound(draws) : Double.NaN;
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
    public boolean[] conditional() {
        return conditional.clone();
    }

    @Override
    public boolean equals(Object o) {
        return o instanceof ProbabilityBest p && method == p.method && draws == p.draws
                && Arrays.equals(alpha, p.alpha) && Arrays.equals(standardError, p.standardError)
                && Arrays.equals(conditional, p.conditional);
    }

    @Override
    public int hashCode() {
        return 31 * Arrays.hashCode(alpha) + Arrays.hashCode(standardError) + method.hashCode() + draws
                + Arrays.hashCode(conditional);
    }

    @Override
    public String toString() {
        return "ProbabilityBest[" + method + ", draws=" + draws + ", alpha=" + Arrays.toString(alpha)
                + ", standardError=" + Arrays.toString(standardError) + ", conditional="
                + Arrays.toString(conditional) + "]";
    }

    /** How alpha was computed. */
    public enum Method {
        /** One-dimensional numerical integration in log space. */
        EXACT,
        /** Seeded joint posterior draws. */
        MONTE_CARLO
    }
}
