package dev.runoff.engine.best;

import dev.runoff.engine.posterior.BetaPosterior;
import dev.runoff.engine.posterior.Posterior;
import dev.runoff.engine.special.GaussLegendre;
import java.util.ArrayList;
import java.util.List;
import java.util.function.Function;

/**
 * The integration of arms that win no draw as engine version 1.4 does it: each selected arm's integral
 * {@code alpha_i = integral f_i(x) prod_{j != i} F_j(x) dx} on its own panels, laid out from the peak of its
 * integrand, instead of engine 1.3's shared grid over tail ranges that are solved first and deepened, pass by
 * pass, while an alpha is too small for them.
 *
 * <p>Design. When every posterior is a Beta with both shapes at least 1, each integrand {@code g_i = e^phi_i}
 * is log-concave (as {@link PrunedNodes} argues: products of log-concave functions are log-concave, and so are
 * the distribution functions of log-concave densities; Bagnoli and Bergstrom 2005, "Log-concave probability and
 * its applications", Economic Theory 26, from memory). Then:
 * <ol>
 *   <li>The peak: a few safeguarded Newton steps on {@code phi'} ({@link PeakIntegrand}; {@code phi'} decreases,
 *       and is positive at the mode of {@code f_i}), from the precision-weighted mean of arm i and the
 *       strongest other arm (where the product of their two normal approximations peaks). The peak need not be
 *       exact: it only centres the panels, and the tail bounds below decide where they end.</li>
 *   <li>Panels: from {@code sqrt(2 STOP)} local standard deviations ({@code 1 / sqrt(-phi'')} at the peak)
 *       below the peak, left to right, 20-point Gauss-Legendre panels of width {@code FACTOR / sqrt(K)} with
 *       {@code K} the curvature bound of {@link PeakIntegrand#curvature} at both ends of the panel: engine 1.3's
 *       rule and width, with {@value #FACTOR} for 1.3's 8 (1.3's panels are shared by every arm and must also
 *       resolve the leader's body; here each integrand is one smooth peak).</li>
 *   <li>Tails: by concavity, once {@code phi} decreases between the last two nodes {@code x' < x} with secant
 *       slope {@code -s}, {@code integral_x^infinity g_i <= g_i(x) / s}; below the first node {@code x1}, where
 *       {@code phi} increases towards the second with secant slope {@code s}, {@code integral_-infinity^x1 g_i
 *       <= g_i(x1) / s}. Panels are added to the right until the right bound is {@code e^-STOP} of the integral
 *       so far, and to the left (from the first node down) until the left bound is.</li>
 * </ol>
 * So the tails cost each alpha at most {@code 2 e^-STOP} (about {@code 1.9e-13}) of its value, whatever its size
 * down to about 1e-300: no range roots, no deeper passes. The quadrature error of the wider panels is measured,
 * not bounded: against engine 1.2's integration the worst relative difference was 1.1e-12 over the 6,771
 * trailing arms of 2,000 experiments of the recompute pool and 1.5e-10 (absolute 9e-12) over 3,610 arms of
 * 2,000 random configurations of 2 to 8 arms with up to 30,000 trials (factor 12 gave 2.0e-10 and 5.1e-9; 16
 * gave 8e-7). PeakQuadratureTest holds it to 1e-9 relative against 1.2, mpmath and Commons Math: inside the
 * audit's cross-check slack of 1e-9 (absolute, for these arms' standard error of 0) and the job's rounding of
 * alphas to 1e-9, and far below the 1e-4 relative that top-two weights need from the ratios of tiny alphas.
 * Other posteriors (a shape below 1, Student-t), a peak at an end of the support, or more than
 * {@value #MAX_PANELS} panels fall back to engine 1.3's integration ({@link FastExactProbabilityBest}).
 * Deterministic (StrictMath).
 */
final class PeakQuadrature {
    /** Log of the largest share of an integral its two cut tails may hold (engine 1.4). */
    static final double STOP = 30;
    /** Panel width in local standard deviations (engine 1.4; engine 1.3: 8). */
    static final double FACTOR = 10;
    /** Gauss-Legendre points per panel (engine 1.4). */
    static final int POINTS = 20;
    /** Engine 1.4's integration: tails cut at {@code e^-30}, panels of factor 10, 20 points. */
    static final PeakQuadrature V1_4 = new PeakQuadrature(STOP, FACTOR, POINTS);
    private static final int NEWTON_STEPS = 6;
    private static final double NEWTON_TOLERANCE = 0.25;
    private static final int MAX_PANELS = 64;
    private static final int MAX_HALVINGS = 60;

    private final double stop;
    private final double factor;
    private final GaussLegendre rule;
    private final double[] logWeights;
    private final Function<PeakIntegrand, LogIntegrand> sweeps;

    /**
     * An integration whose cut tails hold at most {@code e^-stop} of each integral, with {@code points}-point
     * Gauss-Legendre panels {@code factor} local standard deviations wide, evaluating the integrand at the
     * nodes by {@link PeakIntegrand#sweep} (engine versions 1.4 and 1.5).
     */
    PeakQuadrature(double stop, double factor, int points) {
        this(stop, factor, points, PeakIntegrand::fresh);
    }

    /**
     * As {@link #PeakQuadrature(double, double, int)}, each sweep of panels evaluating the integrand by what
     * {@code sweeps} makes from the integrand the peak search used (a fresh evaluator per sweep).
     */
    PeakQuadrature(double stop, double factor, int points, Function<PeakIntegrand, LogIntegrand> sweeps) {
        this.stop = stop;
        this.factor = factor;
        this.rule = GaussLegendre.of(points);
        this.logWeights = logWeights(rule);
        this.sweeps = sweeps;
    }

    /**
     * The alphas of the arms selected by {@code which} (the others are 0), by this integration: with
     * {@link #V1_4}, the {@link ExactAlphas} of engine version 1.4.
     *
     * @throws IllegalArgumentException if fewer than two posteriors are given or one is null
     */
    double[] selected(List<? extends Posterior> posteriors, boolean[] which) {
        ExactProbabilityBest.checkPosteriors(posteriors);
        List<BetaPosterior> betas = logConcaveBetas(posteriors);
        if (betas == null) {
            return FastExactProbabilityBest.selected(posteriors, which);
        }
        double[] alpha = new double[posteriors.size()];
        for (int i = 0; i < alpha.length; i++) {
            if (which[i]) {
                alpha[i] = integral(betas, i);
                if (Double.isNaN(alpha[i])) {
                    return FastExactProbabilityBest.selected(posteriors, which);
                }
            }
        }
        return alpha;
    }

    /** The posteriors as Beta posteriors with both shapes at least 1, or null when one is not. */
    private static List<BetaPosterior> logConcaveBetas(List<? extends Posterior> posteriors) {
        List<BetaPosterior> betas = new ArrayList<>(posteriors.size());
        for (Posterior p : posteriors) {
            if (!(p instanceof BetaPosterior beta) || beta.a() < 1 || beta.b() < 1) {
                return null;
            }
            betas.add(beta);
        }
        return betas;
    }

    /** Arm {@code i}'s alpha, or NaN when this integration does not apply (the caller falls back). */
    double integral(List<BetaPosterior> betas, int i) {
        PeakIntegrand search = new PeakIntegrand(betas, i);
        double[] peak = peak(search, i);
        if (peak == null) {
            return Double.NaN;
        }
        double sd = 1 / Math.sqrt(-peak[2]);
        double start = peak[0] - Math.sqrt(2 * stop) * sd;
        if (!(start > 0) || !(peak[0] + sd < 1)) {
            return Double.NaN;
        }
        Sweep sweep = new Sweep(sweeps.apply(search));
        double left = start;
        int panels = 0;
        do {
            if (++panels > MAX_PANELS) {
                return Double.NaN;
            }
            left = sweep.panel(left, nextEdge(search, left));
        } while (left < 1 && !sweep.rightTailNegligible());
        return sweep.withLeftTail(search, start, MAX_PANELS - panels);
    }

    /**
     * {@code {x, phi(x), phi''(x)}} near the peak of {@code phi}, or null when no interior peak is found. Newton
     * steps on {@code phi'}, kept inside the bracket of points where {@code phi'} was seen positive and negative
     * (bisecting when a step leaves it), until a step is below {@value #NEWTON_TOLERANCE} local standard
     * deviations.
     */
    private static double[] peak(PeakIntegrand phi, int i) {
        double low = phi.mode(i);
        double high = 1;
        double x = Math.max(low, start(phi, i));
        double[] d = new double[3];
        for (int step = 0; step < NEWTON_STEPS; step++) {
            if (!(x > 0 && x < 1)) {
                return null;
            }
            phi.derivatives(x, d);
            if (!(d[2] < 0) || Double.isNaN(d[1])) {
                return null;
            }
            if (d[1] > 0) {
                low = Math.max(low, x);
            } else {
                high = Math.min(high, x);
            }
            double move = -d[1] / d[2];
            if (Math.abs(move) * Math.sqrt(-d[2]) <= NEWTON_TOLERANCE) {
                break;
            }
            double next = x + move;
            x = next > low && next < high ? next : 0.5 * (low + high);
        }
        return new double[] {x, d[0], d[2]};
    }

    /**
     * The precision-weighted mean of arm i and of the other arm with the highest mean: the peak of the product
     * of their normal densities, near which the product of arm i's density and that arm's lower tail peaks when
     * the two are far apart.
     */
    private static double start(PeakIntegrand phi, int i) {
        int strongest = -1;
        for (int j = 0; j < phi.count(); j++) {
            if (j != i && (strongest < 0 || phi.mean(j) > phi.mean(strongest))) {
                strongest = j;
            }
        }
        double wi = 1 / phi.variance(i);
        double ws = 1 / phi.variance(strongest);
        return (wi * phi.mean(i) + ws * phi.mean(strongest)) / (wi + ws);
    }

    /** Right edge of the panel from {@code left}: {@code FACTOR / sqrt(K)} at both ends, as engine 1.3's. */
    private double nextEdge(PeakIntegrand phi, double left) {
        double h = factor / Math.sqrt(phi.curvature(left));
        for (int halving = 0; halving < MAX_HALVINGS && left + h < 1; halving++) {
            if (h <= factor / Math.sqrt(phi.curvature(left + h))) {
                break;
            }
            h *= 0.5;
        }
        return Math.min(left + h, 1);
    }

    /** Left edge of the panel that ends at {@code right}, by the rule of {@link #nextEdge}. */
    private double previousEdge(PeakIntegrand phi, double right) {
        double h = factor / Math.sqrt(phi.curvature(right));
        for (int halving = 0; halving < MAX_HALVINGS && right - h > 0; halving++) {
            if (h <= factor / Math.sqrt(phi.curvature(right - h))) {
                break;
            }
            h *= 0.5;
        }
        return Math.max(right - h, 0);
    }

    private static double[] logWeights(GaussLegendre rule) {
        double[] w = new double[rule.size()];
        for (int k = 0; k < w.length; k++) {
            w[k] = StrictMath.log(rule.weight(k));
        }
        return w;
    }

    /**
     * The panels of one integral, left to right, in log space: the sum so far, and the last two nodes for the
     * right tail's bound.
     */
    private final class Sweep {
        private final LogIntegrand phi;
        private final ExactIntegrator.Accumulator sum = new ExactIntegrator.Accumulator(1);
        private int nodes;
        private double firstX;
        private double firstPhi;
        private double secondX;
        private double secondPhi;
        private double lastX;
        private double lastPhi;
        private double previousX;
        private double previousPhi;

        Sweep(LogIntegrand phi) {
            this.phi = phi;
        }

        /** Adds the panel {@code [left, right]}; returns {@code right}. */
        double panel(double left, double right) {
            double half = 0.5 * (right - left);
            double mid = left + half;
            double logHalf = StrictMath.log(half);
            for (int k = 0; k < rule.size(); k++) {
                double x = mid + half * rule.node(k);
                if (x > 0 && x < 1) {
                    node(x, phi.sweep(x), logHalf + logWeights[k]);
                }
            }
            return right;
        }

        private void node(double x, double value, double logWeight) {
            sum.add(0, value + logWeight);
            if (nodes == 0) {
                firstX = x;
                firstPhi = value;
            } else if (nodes == 1) {
                secondX = x;
                secondPhi = value;
            }
            nodes++;
            previousX = lastX;
            previousPhi = lastPhi;
            lastX = x;
            lastPhi = value;
        }

        /** Whether {@code phi} decreases at the last node and the bound of what lies beyond is negligible. */
        boolean rightTailNegligible() {
            if (!(lastPhi < previousPhi)) {
                return false;
            }
            double s = (previousPhi - lastPhi) / (lastX - previousX);
            return lastPhi - StrictMath.log(s) < sum.logValue(0) - stop;
        }

        /**
         * The integral with panels added below {@code start} (fresh evaluations, right to left) until the bound
         * of the left tail is negligible; NaN when more than {@code panelsLeft} would be needed.
         */
        double withLeftTail(PeakIntegrand search, double start, int panelsLeft) {
            double edge = start;
            double x1 = firstX;
            double phi1 = firstPhi;
            double x2 = secondX;
            double phi2 = secondPhi;
            for (int panel = 0; edge > 0 && !leftTailNegligible(x1, phi1, x2, phi2); panel++) {
                if (panel >= panelsLeft) {
                    return Double.NaN;
                }
                double left = previousEdge(search, edge);
                Sweep part = new Sweep(sweeps.apply(search));
                part.panel(left, edge);
                sum.add(0, part.sum.logValue(0));
                x1 = part.firstX;
                phi1 = part.firstPhi;
                x2 = part.secondX;
                phi2 = part.secondPhi;
                edge = left;
            }
            return sum.value(0);
        }

        private boolean leftTailNegligible(double x1, double phi1, double x2, double phi2) {
            if (!(phi2 > phi1)) {
                return false;
            }
            double s = (phi2 - phi1) / (x2 - x1);
            return phi1 - StrictMath.log(s) < sum.logValue(0) - stop;
        }
    }
}
