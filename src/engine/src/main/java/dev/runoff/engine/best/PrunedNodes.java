package dev.runoff.engine.best;

import java.util.Arrays;
import java.util.List;

/**
 * The node terms of the probability-of-being-best integrals as engine version 1.3 adds them: those of
 * {@link ExactIntegrator}, less two kinds of work that cannot change a result by more than
 * {@code e^-40} (about {@code 4e-18}) relative.
 *
 * <p>Design:
 * <ul>
 *   <li>Ended integrals. When every arm's density is log-concave (Beta with both shapes at least 1), so is
 *       each integrand {@code g_i = f_i prod_{j != i} F_j}: products of log-concave functions are log-concave,
 *       so are the distribution functions of log-concave densities, and Beta densities are log-concave when
 *       both shapes are at least 1 (Wikipedia, "Logarithmically concave function", sections on operations
 *       preserving log-concavity and on log-concave distributions; proved in Bagnoli and Bergstrom 2005,
 *       "Log-concave probability and its applications", Economic Theory 26, from memory). Then {@code phi = log g_i} is concave, and
 *       once it decreases between two nodes {@code x' < x} its slope beyond {@code x} is at most the secant's
 *       {@code -s}, so {@code integral_x^infinity g_i <= g_i(x) / s}. When that bound is {@code e^-STOP}
 *       below the integral so far, integral i ends: its later nodes are not evaluated. An integral whose
 *       tiny alpha sends the range far into the tails ({@link ExactProbabilityBest}'s deeper passes) thus
 *       ends a few local standard deviations past its peak instead of at the range's end.</li>
 *   <li>Saturated distribution functions. {@code F_j} increases with {@code x}; once a node gives
 *       {@code log F_j > -e^-STOP}, every later {@code log F_j} lies between that value and 0, and is taken
 *       as 0 (an error below {@code e^-STOP} in the log of each product).</li>
 * </ul>
 * Not thread-safe: one instance per integration.
 */
final class PrunedNodes {
    /** Log of the relative size below which a remainder or a factor's distance from 1 is dropped. */
    private static final double STOP = 40;
    private static final double SATURATED = -StrictMath.exp(-STOP);

    private final boolean[] live;
    private final boolean[] saturated;
    private final double[] lastX;
    private final double[] lastLog;

    /** State for the integrals selected by {@code which}. */
    PrunedNodes(boolean[] which) {
        int n = which.length;
        this.live = which.clone();
        this.saturated = new boolean[n];
        this.lastX = new double[n];
        this.lastLog = new double[n];
        Arrays.fill(lastLog, Double.NEGATIVE_INFINITY);
    }

    /** Whether every arm's density is log-concave (so that every integrand is). */
    static boolean applies(List<ExactArm> arms) {
        for (ExactArm arm : arms) {
            if (!arm.logConcave()) {
                return false;
            }
        }
        return true;
    }

    /** The integrals not yet ended (read by the panel widths; changes as integrals end). */
    boolean[] live() {
        return live;
    }

    /** Whether some integral has not ended. */
    boolean anyLive() {
        for (boolean b : live) {
            if (b) {
                return true;
            }
        }
        return false;
    }

    /**
     * Adds the node's terms to the live integrals whose range holds {@code x}, as
     * {@code ExactIntegrator.addNode} does for densities, and ends the integrals whose remainder is negligible.
     */
    void add(List<ExactArm> arms, double[] from, double[] to, double x, double logWeight, double[] logCdf,
             double[] prefix, ExactIntegrator.Accumulator acc) {
        int n = arms.size();
        int integrals = 0;
        int only = -1;
        for (int i = 0; i < n; i++) {
            if (live[i] && x >= from[i] && x <= to[i]) {
                integrals++;
                only = i;
            }
        }
        if (integrals == 0) {
            return;
        }
        for (int j = 0; j < n; j++) {
            logCdf[j] = factor(arms.get(j), j, x, integrals == 1 && j == only);
            prefix[j + 1] = prefix[j] + logCdf[j];
        }
        double suffix = 0;
        for (int i = n - 1; i >= 0; i--) {
            if (live[i] && x >= from[i] && x <= to[i]) {
                double log = arms.get(i).logDensity(x) + prefix[i] + suffix;
                acc.add(i, log + logWeight);
                if (log < lastLog[i] && log + logWeight < acc.max(i) - STOP) {
                    double slope = (lastLog[i] - log) / (x - lastX[i]);
                    if (log - StrictMath.log(slope) < acc.logValue(i) - STOP) {
                        live[i] = false;
                    }
                }
                lastLog[i] = log;
                lastX[i] = x;
            }
            suffix += logCdf[i];
        }
    }

    /** {@code log F_j(x)} as the products use it. */
    private double factor(ExactArm arm, int j, double x, boolean skipped) {
        if (skipped || saturated[j] || x > arm.upper()) {
            return 0;
        }
        if (x < arm.lower()) {
            return Double.NEGATIVE_INFINITY;
        }
        double logF = arm.logCdf(x);
        if (logF > SATURATED) {
            saturated[j] = true;
        }
        return logF;
    }
}
