package dev.runoff.audit;

/**
 * The mixture of candidate weight vectors that best explains a period's exposures: the {@code lambda} on the
 * simplex minimising Pearson's statistic {@code f(lambda) = sum o_i^2 / (n p_i(lambda)) - n}, with
 * {@code p(lambda) = sum_k lambda_k v_k} (minimum chi-square, Cramér 1946), and a certified lower bound of the
 * minimum.
 *
 * <p>Design: {@code p} is affine in {@code lambda} and {@code x -> o^2 / x} is convex for {@code x > 0}, so
 * {@code f} is convex on the simplex. The Frank-Wolfe method (Frank &amp; Wolfe 1956) minimises it: at each
 * step the linear minimiser of the gradient over the simplex is a vertex {@code e_s} (the coordinate with the
 * least partial derivative). The plain step toward {@code e_s} zig-zags when the minimum lies on a face (as it
 * usually does here, most candidates getting no share), so each step is the pairwise variant: weight moves from
 * the "away" vertex {@code e_a} (the candidate in use with the largest partial derivative) to {@code e_s}, which
 * can drop a candidate exactly and converges linearly on a polytope (Lacoste-Julien &amp; Jaggi 2015, "On the
 * Global Linear Convergence of Frank-Wolfe Optimization Variants", NeurIPS; from memory). The step length is
 * found by golden-section search (Kiefer 1953), exact up to its tolerance since the one-dimensional restriction
 * is convex. The Frank-Wolfe duality
 * gap {@code g(lambda) = grad f(lambda) . (lambda - e_s)} bounds the suboptimality, {@code f(lambda) - f* <= g}
 * (Jaggi 2013, "Revisiting Frank-Wolfe: Projection-Free Sparse Convex Optimization", ICML; it follows from
 * convexity, {@code f* >= min over vertices e of f(lambda) + grad f(lambda) . (e - lambda)}), so
 * {@code f(lambda) - g} is a certified lower bound of the minimum however loosely the method converged. The
 * start is the barycentre, where every arm that any candidate weights has a positive share, so {@code f} is
 * finite there and only decreases.
 */
final class MixtureFit {

    /** Largest number of Frank-Wolfe steps. */
    static final int MAX_STEPS = 2_000;
    /** Stop once the duality gap is below this (absolute, in units of the statistic). */
    static final double GAP_TOLERANCE = 1e-9;
    private static final double LINE_TOLERANCE = 1e-12;
    private static final double INVERSE_PHI = (StrictMath.sqrt(5.0) - 1.0) / 2.0;

    private final long[] observed;
    private final double[][] vectors;

    /** The fitted mixture weights, the statistic there and the duality gap. */
    record Result(double[] lambda, double[] shares, double statistic, double gap) {

        /** The certified lower bound of the minimum, {@code max(0, statistic - gap)}. */
        double lowerBound() {
            return Math.max(0.0, statistic - gap);
        }
    }

    private MixtureFit(long[] observed, double[][] vectors) {
        this.observed = observed;
        this.vectors = vectors;
    }

    /**
     * Fits the mixture of {@code vectors} (each over the arms of {@code observed}) that minimises Pearson's
     * statistic; every arm with an exposure must have a positive weight in some vector.
     */
    static Result fit(long[] observed, double[][] vectors) {
        if (vectors.length == 0) {
            throw new IllegalArgumentException("no candidate weight vectors");
        }
        return new MixtureFit(observed, vectors).run();
    }

    private Result run() {
        int k = vectors.length;
        double[] lambda = new double[k];
        java.util.Arrays.fill(lambda, 1.0 / k);
        double value = value(lambda);
        double gap = Double.POSITIVE_INFINITY;
        for (int step = 0; step < MAX_STEPS; step++) {
            double[] gradient = gradient(shares(lambda));
            int s = 0;
            int away = -1;
            double dot = 0;
            for (int j = 0; j < k; j++) {
                dot += lambda[j] * gradient[j];
                if (gradient[j] < gradient[s]) {
                    s = j;
                }
                if (lambda[j] > 0 && (away < 0 || gradient[j] > gradient[away])) {
                    away = j;
                }
            }
            gap = Math.max(0.0, dot - gradient[s]);
            if (gap <= GAP_TOLERANCE || away == s) {
                break;
            }
            double[] from = lambda;
            int a = away;
            int to = s;
            double max = lambda[a];
            double gamma = lineSearch(g -> move(from, a, to, g), max, value);
            if (gamma == 0.0) {
                break;
            }
            lambda = move(from, a, to, gamma);
            value = value(lambda);
        }
        return new Result(lambda, shares(lambda), value, gap);
    }

    /** {@code lambda} with {@code gamma} of the weight of {@code a} moved to {@code s} (a pairwise step). */
    private static double[] move(double[] lambda, int a, int s, double gamma) {
        double[] next = lambda.clone();
        next[a] = gamma >= lambda[a] ? 0.0 : lambda[a] - gamma;
        next[s] += gamma;
        return next;
    }

    /** The step {@code gamma} in [0, max] along {@code point} that minimises the statistic. */
    private double lineSearch(java.util.function.DoubleFunction<double[]> point, double max, double atZero) {
        double lo = 0.0;
        double hi = max;
        double a = hi - INVERSE_PHI * (hi - lo);
        double b = lo + INVERSE_PHI * (hi - lo);
        double fa = value(point.apply(a));
        double fb = value(point.apply(b));
        while (hi - lo > LINE_TOLERANCE) {
            if (fa <= fb) {
                hi = b;
                b = a;
                fb = fa;
                a = hi - INVERSE_PHI * (hi - lo);
                fa = value(point.apply(a));
            } else {
                lo = a;
                a = b;
                fa = fb;
                b = lo + INVERSE_PHI * (hi - lo);
                fb = value(point.apply(b));
            }
        }
        double best = 0.0;
        double fBest = atZero;
        for (double gamma : new double[] {(lo + hi) / 2.0, max}) {
            double f = value(point.apply(gamma));
            if (f < fBest) {
                best = gamma;
                fBest = f;
            }
        }
        return best;
    }

    private double[] shares(double[] lambda) {
        double[] p = new double[observed.length];
        for (int j = 0; j < vectors.length; j++) {
            for (int i = 0; i < p.length; i++) {
                p[i] += lambda[j] * vectors[j][i];
            }
        }
        return p;
    }

    private double value(double[] lambda) {
        return LagMixture.pearson(observed, shares(lambda));
    }

    /** Partial derivatives {@code -sum_i o_i^2 v_ji / (n p_i^2)}; cells with no exposures add nothing. */
    private double[] gradient(double[] p) {
        long n = 0;
        for (long o : observed) {
            n += o;
        }
        double[] g = new double[vectors.length];
        for (int i = 0; i < p.length; i++) {
            if (observed[i] == 0) {
                continue;
            }
            double c = (double) observed[i] * observed[i] / (n * p[i] * p[i]);
            for (int j = 0; j < g.length; j++) {
                g[j] -= c * vectors[j][i];
            }
        }
        return g;
    }
}
