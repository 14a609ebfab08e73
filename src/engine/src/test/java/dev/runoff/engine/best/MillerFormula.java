package dev.runoff.engine.best;

import java.math.BigInteger;
import java.util.ArrayList;
import java.util.List;
import org.apache.commons.math3.fraction.BigFraction;

/**
 * Exact reference for two Beta arms with integer parameters: Miller (2015), "Formulas for Bayesian A/B
 * Testing" (evanmiller.org), closed form
 * <pre>
 *   P(p_B > p_A) = sum_{i=0}^{alpha_B - 1} B(alpha_A + i, beta_A + beta_B)
 *                  / ((beta_B + i) B(1 + i, beta_B) B(alpha_A, beta_A))
 * </pre>
 * for p_A ~ Beta(alpha_A, beta_A), p_B ~ Beta(alpha_B, beta_B), evaluated in exact rational arithmetic
 * (B(m, n) = (m-1)! (n-1)! / (m+n-1)! for integers). Test code only.
 */
final class MillerFormula {
    private static final List<BigInteger> FACTORIALS = new ArrayList<>(List.of(BigInteger.ONE));

    private MillerFormula() {
    }

    /** P(p_B > p_A) exactly. */
    static BigFraction probabilityBBeatsA(int alphaA, int betaA, int alphaB, int betaB) {
        BigFraction sum = BigFraction.ZERO;
        BigFraction betaAB = beta(alphaA, betaA);
        for (int i = 0; i < alphaB; i++) {
            BigFraction numerator = beta(alphaA + i, betaA + betaB);
            BigFraction denominator = beta(1 + i, betaB).multiply(betaAB).multiply(betaB + i);
            sum = sum.add(numerator.divide(denominator));
        }
        return sum;
    }

    private static BigFraction beta(int m, int n) {
        return new BigFraction(factorial(m - 1).multiply(factorial(n - 1)), factorial(m + n - 1));
    }

    private static synchronized BigInteger factorial(int k) {
        while (FACTORIALS.size() <= k) {
            int next = FACTORIALS.size();
            FACTORIALS.add(FACTORIALS.get(next - 1).multiply(BigInteger.valueOf(next)));
        }
        return FACTORIALS.get(k);
    }
}
