package dev.runoff.audit;

/**
 * Pearson's chi-square statistic (Pearson 1900) of a period's exposures against the mixture
 * {@code lambda * previous + (1 - lambda) * current} of two weight vectors, and the {@code lambda} in [0, 1]
 * that minimises it (minimum chi-square estimation, Cramér 1946, "Mathematical Methods of Statistics").
 *
 * <p>Design: with {@code p_i(lambda)} affine in {@code lambda} and summing to one, the statistic is
 * {@code sum o_i^2 / (n p_i(lambda)) - n}, a sum of convex functions of {@code lambda}, so it has a single
 * minimum on [0, 1] and a golden-section search (Kiefer 1953) finds it; the end points are compared too, since
 * the minimum is often there (no lag at all, or every exposure served late).
 */
final class LagMixture {

    /** Golden-section stopping width on [0, 1]. */
    private static final double TOLERANCE = 1e-10;
    private static final double INVERSE_PHI = (StrictMath.sqrt(5.0) - 1.0) / 2.0;

    private LagMixture() {
    }

    /** The shares {@code lambda * previous + (1 - lambda) * current}. */
    static double[] shares(double lambda, double[] previous, double[] current) {
        double[] shares = new double[current.length];
        for (int i = 0; i < shares.length; i++) {
            shares[i] = lambda * previous[i] + (1.0 - lambda) * current[i];
        }
        return shares;
    }

    /**
     * Pearson's statistic of {@code observed} (total {@code n}) against expected counts {@code n * shares[i]};
     * a cell with share 0 adds nothing when empty and makes the statistic infinite otherwise.
     */
    static double pearson(long[] observed, double[] shares) {
        long n = 0;
        for (long o : observed) {
            n += o;
        }
        double statistic = 0;
        for (int i = 0; i < observed.length; i++) {
            double expected = shares[i] * n;
            if (expected > 0) {
                double d = observed[i] - expected;
                statistic += d * d / expected;
            } else if (observed[i] > 0) {
                return Double.POSITIVE_INFINITY;
            }
        }
        return statistic;
    }

    /** The {@code lambda} in [0, 1] that minimises {@link #pearson} against the mixture. */
    static double fit(long[] observed, double[] previous, double[] current) {
        double lo = 0.0;
        double hi = 1.0;
        double a = hi - INVERSE_PHI * (hi - lo);
        double b = lo + INVERSE_PHI * (hi - lo);
        double fa = at(a, observed, previous, current);
        double fb = at(b, observed, previous, current);
        while (hi - lo > TOLERANCE) {
            if (fa <= fb) {
                hi = b;
                b = a;
                fb = fa;
                a = hi - INVERSE_PHI * (hi - lo);
                fa = at(a, observed, previous, current);
            } else {
                lo = a;
                a = b;
                fa = fb;
                b = lo + INVERSE_PHI * (hi - lo);
                fb = at(b, observed, previous, current);
            }
        }
        double best = (lo + hi) / 2.0;
        double fBest = at(best, observed, previous, current);
        for (double end : new double[] {0.0, 1.0}) {
            double fEnd = at(end, observed, previous, current);
            if (fEnd <= fBest) {
                best = end;
                fBest = fEnd;
            }
        }
        return best;
    }

    private static double at(double lambda, long[] observed, double[] previous, double[] current) {
        return pearson(observed, shares(lambda, previous, current));
    }
}
