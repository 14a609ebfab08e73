package dev.runoff.engine.special;

import dev.runoff.engine.core.Checks;

/**
 * An n-point Gauss-Legendre rule on {@code [-1, 1]}: exact for polynomials of degree {@code 2n - 1}.
 * Nodes are the roots of the Legendre polynomial P_n, found by Newton's method from the Chebyshev-like
 * first guess {@code cos(pi (i - 1/4) / (n + 1/2))}; weights are {@code 2 / ((1 - x^2) P_n'(x)^2)}
 * (Press et al. 2007, "Numerical Recipes", 3rd ed., section 4.6, routine gauleg). Immutable.
 */
public final class GaussLegendre {
    private static final int MAX_POINTS = 64;
    private static final int NEWTON_STEPS = 100;

    private final double[] nodes;
    private final double[] weights;

    private GaussLegendre(int n) {
        nodes = new double[n];
        weights = new double[n];
        int half = (n + 1) / 2;
        for (int i = 0; i < half; i++) {
            double z = StrictMath.cos(Math.PI * (i + 0.75) / (n + 0.5));
            double derivative = 0;
            for (int step = 0; step < NEWTON_STEPS; step++) {
                double[] pd = legendre(n, z);
                derivative = pd[1];
                double previous = z;
                z = previous - pd[0] / derivative;
                if (Math.abs(z - previous) <= 1e-16) {
                    derivative = legendre(n, z)[1];
                    break;
                }
            }
            double w = 2 / ((1 - z * z) * derivative * derivative);
            nodes[i] = -z;
            nodes[n - 1 - i] = z;
            weights[i] = w;
            weights[n - 1 - i] = w;
        }
    }

    /**
     * The rule with {@code n} points.
     *
     * @param n number of points, 1 to 64
     */
    public static GaussLegendre of(int n) {
        Checks.inClosedRange("Gauss-Legendre points", n, 1, MAX_POINTS);
        return new GaussLegendre(n);
    }

    /** Number of points. */
    public int size() {
        return nodes.length;
    }

    /** Node {@code i} in {@code (-1, 1)}, ascending in {@code i}. */
    public double node(int i) {
        return nodes[i];
    }

    /** Weight of node {@code i}; the weights sum to 2. */
    public double weight(int i) {
        return weights[i];
    }

    /** {P_n(z), P_n'(z)} by the three-term recurrence. */
    private static double[] legendre(int n, double z) {
        double p1 = 1;
        double p2 = 0;
        for (int j = 1; j <= n; j++) {
            double p3 = p2;
            p2 = p1;
            p1 = ((2 * j - 1) * z * p2 - (j - 1) * p3) / j;
        }
        return new double[] {p1, n * (z * p1 - p2) / (z * z - 1)};
    }
}
