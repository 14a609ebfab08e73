package dev.runoff.engine.best;

import dev.runoff.engine.special.GaussLegendre;
import java.util.Arrays;
import java.util.List;

/**
 * The shared quadrature behind the exact probabilities and expected gains: for each selected arm i,
 * <pre>
 *   I_i = integral over [from_i, to_i] of g_i(x) * prod_{j != i} F_j(x) dx,   g_i = f_i (density) or S_i
 * </pre>
 * computed in log space: at each node the logs of the factors are summed and the node's term is scaled by a
 * running maximum before exponentiation, so integrands far below the double range keep their relative
 * accuracy.
 *
 * <p>Design: composite Gauss-Legendre panels on one grid shared by all arms, so {@code log F_j} is computed
 * once per node and reused by every integral. The panel width at {@code x} is
 * {@code factor / sqrt(K(x))} where {@code K} adds the curvatures of the log factors that vary at x
 * (see {@link ExactArm#curvature}) and the factor and the rule are those of {@link Panels} (engine version
 * 1.2: 2.5 and 10 points; 1.3: 8 and 20); with 10 points per panel the rule is exact for polynomials of degree
 * 19, and its error on a Gaussian-like factor 2.5 local standard deviations wide is near double precision
 * (the Gauss error term, Davis and Rabinowitz 1984, "Methods of Numerical Integration", section 2.7).
 * Measured against the same integrals on panels six times narrower over 60 random configurations of 2 to
 * 20 Beta or Student-t arms: worst relative difference 2.5e-13, about 360 nodes per configuration.
 * {@code prod_{j != i}} is formed from prefix and suffix sums of the logs, never by subtracting
 * {@code log F_i} from the total. Engine version 1.3 adds node terms through {@link PrunedNodes}.
 */
final class ExactIntegrator {
    private static final int MAX_PANELS = 200_000;
    private static final double NEGLIGIBLE = 50;
    private static final int MAX_HALVINGS = 60;

    /** Which factor the integral of arm i carries for arm i itself. */
    enum Own {
        /** {@code f_i}: probabilities of being best. */
        DENSITY,
        /** {@code S_i}: expected gains. */
        SURVIVAL
    }

    /**
     * The panels of one engine version: a Gauss-Legendre rule, the panel factor, and whether a panel may
     * step over the centre of a Beta arm whose range it starts in (see {@link #nextEdge}).
     */
    static final class Panels {
        /** Engine version 1.2: 10 points, factor 2.5, no panel steps over a centre, every node evaluated. */
        static final Panels ENGINE_1_2 = new Panels(10, 2.5, false, false);

        private final GaussLegendre rule;
        private final double[] logWeights;
        private final double factor;
        private final boolean overActiveBetaCentres;
        private final boolean pruned;

        /**
         * @param pruned evaluate nodes with {@link PrunedNodes} when every arm is log-concave (ends integrals
         *               whose remainder is negligible and stops computing saturated distribution functions)
         */
        Panels(int points, double factor, boolean overActiveBetaCentres, boolean pruned) {
            this.rule = GaussLegendre.of(points);
            this.logWeights = new double[points];
            for (int k = 0; k < points; k++) {
                logWeights[k] = StrictMath.log(rule.weight(k));
            }
            this.factor = factor;
            this.overActiveBetaCentres = overActiveBetaCentres;
            this.pruned = pruned;
        }
    }

    private ExactIntegrator() {
    }

    /**
     * The integrals {@code I_i} of the selected arms.
     *
     * @param arms  all arms (their CDFs enter every product)
     * @param from  lower limit of each arm's integral
     * @param to    upper limit of each arm's integral ({@code <= from} gives 0)
     * @param own   the arm's own factor
     * @param which which integrals to compute (others are returned as 0)
     */
    static double[] integrate(List<ExactArm> arms, double[] from, double[] to, Own own, boolean[] which) {
        return integrate(arms, from, to, own, which, true, Panels.ENGINE_1_2);
    }

    /**
     * As {@link #integrate(List, double[], double[], Own, boolean[])}; {@code close} says whether the part of
     * a density integral above {@code to} is added as a closing term (false when another integral covers
     * that part).
     */
    static double[] integrate(List<ExactArm> arms, double[] from, double[] to, Own own, boolean[] which,
                              boolean close, Panels grid) {
        int n = arms.size();
        double start = Double.POSITIVE_INFINITY;
        double end = Double.NEGATIVE_INFINITY;
        for (int i = 0; i < n; i++) {
            if (which[i] && to[i] > from[i]) {
                start = Math.min(start, from[i]);
                end = Math.max(end, to[i]);
            }
        }
        double[] result = new double[n];
        if (!(end > start)) {
            return result;
        }
        Accumulator acc = new Accumulator(n);
        double[] logCdf = new double[n];
        double[] prefix = new double[n + 1];
        PrunedNodes pruned = grid.pruned && own == Own.DENSITY && PrunedNodes.applies(arms) ? new PrunedNodes(which)
                : null;
        boolean[] live = pruned == null ? which : pruned.live();
        double left = start;
        int panels = 0;
        while (left < end && (pruned == null || pruned.anyLive())) {
            double right = nextEdge(arms, from, to, live, left, end, grid);
            if (++panels > MAX_PANELS) {
                throw new ArithmeticException("exact integration needs more than " + MAX_PANELS
                        + " panels on [" + start + ", " + end + "]");
            }
            double half = 0.5 * (right - left);
            double mid = left + half;
            double logHalf = StrictMath.log(half);
            for (int k = 0; k < grid.logWeights.length; k++) {
                double x = mid + half * grid.rule.node(k);
                double logWeight = logHalf + grid.logWeights[k];
                if (pruned != null) {
                    pruned.add(arms, from, to, x, logWeight, logCdf, prefix, acc);
                } else {
                    addNode(arms, from, to, own, which, x, logWeight, logCdf, prefix, acc);
                }
            }
            left = right;
        }
        for (int i = 0; i < n; i++) {
            result[i] = acc.value(i);
            if (close && own == Own.DENSITY && which[i] && to[i] > from[i]) {
                result[i] += beyondEnd(arms, i, to[i], result[i]);
            }
        }
        return result;
    }

    /**
     * The part of {@code integral f_i prod_{j != i} F_j} above {@code end}, which lies between
     * {@code S_i(end) prod_{j != i} F_j(end)} and {@code S_i(end)} (the F_j increase); the lower value is
     * returned. Normally {@code S_i(end) = e^-60} and this is negligible, but when the range of arm i is cut
     * just below the end of its support ({@link ExactArm}: a Beta density with {@code b < 1} is singular
     * there) the missing mass is about {@code 1e-11^b} while the error of the closing term is at most
     * {@code S_i(end) (1 - prod_j F_j(end))}: negligible unless another arm is singular at the same end,
     * then about {@code 1e-11^(b_i + b_j)}.
     */
    private static double beyondEnd(List<ExactArm> arms, int i, double end, double integral) {
        double logTail = arms.get(i).logSurvival(end);
        if (!(logTail > StrictMath.log(integral) - NEGLIGIBLE)) {
            return 0;
        }
        for (int j = 0; j < arms.size(); j++) {
            if (j != i) {
                logTail += arms.get(j).logCdf(end);
            }
        }
        return StrictMath.exp(logTail);
    }

    /**
     * Adds the node's terms to the integrals whose range holds {@code x}. The products leave out each arm's
     * own CDF, so when one integral alone is taken at {@code x} that arm's CDF is not computed (an
     * incomplete beta near the arm's centre, the costliest factor at the node), and when none is, nothing is.
     */
    private static void addNode(List<ExactArm> arms, double[] from, double[] to, Own own, boolean[] which,
                                double x, double logWeight, double[] logCdf, double[] prefix,
                                Accumulator acc) {
        int n = arms.size();
        int integrals = 0;
        int only = -1;
        for (int i = 0; i < n; i++) {
            if (which[i] && x >= from[i] && x <= to[i]) {
                integrals++;
                only = i;
            }
        }
        if (integrals == 0) {
            return;
        }
        for (int j = 0; j < n; j++) {
            ExactArm arm = arms.get(j);
            if (integrals == 1 && j == only) {
                logCdf[j] = 0;
            } else if (x > arm.upper()) {
                logCdf[j] = 0;
            } else if (x < arm.lower()) {
                logCdf[j] = Double.NEGATIVE_INFINITY;
            } else {
                logCdf[j] = arm.logCdf(x);
            }
            prefix[j + 1] = prefix[j] + logCdf[j];
        }
        double suffix = 0;
        for (int i = n - 1; i >= 0; i--) {
            if (which[i] && x >= from[i] && x <= to[i]) {
                double rest = prefix[i] + suffix;
                ExactArm arm = arms.get(i);
                double bound = own == Own.DENSITY ? arm.maxLogDensity() : 0;
                if (rest + bound + logWeight > acc.max(i) - NEGLIGIBLE) {
                    double g = own == Own.DENSITY ? arm.logDensity(x) : arm.logSurvival(x);
                    acc.add(i, g + rest + logWeight);
                }
            }
            suffix += logCdf[i];
        }
    }

    /**
     * Right edge of the panel starting at {@code left}: the width {@code h} must satisfy
     * {@code h <= factor / sqrt(K)} at both ends, halved until it does (geometric panels towards a
     * singular end of the support need one or two halvings; the far end is checked at {@code end} when
     * {@code left + h} rounds beyond it, since beyond every range the curvature is 0 and the check would
     * pass: a range ending at {@code -1e-30} was crossed from {@code -0.001} in one panel). A panel never
     * steps over an arm's centre,
     * where that arm's curvature peaks: the wide geometric panels of a heavy tail would otherwise jump over
     * the whole body of the distribution. With {@link Panels} of engine version 1.3 a panel may step over the
     * centre of a Beta arm whose range it starts in: below that centre the arm's curvature is at least
     * {@code 1 / variance}, so the panel is at most {@code factor} of its standard deviations wide anyway.
     */
    private static double nextEdge(List<ExactArm> arms, double[] from, double[] to, boolean[] which,
                                   double left, double end, Panels panels) {
        double h = Math.min(end - left, width(arms, from, to, which, left, panels.factor));
        for (ExactArm arm : arms) {
            double center = arm.center();
            if (center > left && center < left + h && !(panels.overActiveBetaCentres && arm.isBeta()
                    && arm.active(left))) {
                h = center - left;
            }
        }
        for (int halving = 0; halving < MAX_HALVINGS; halving++) {
            double limit = width(arms, from, to, which, Math.min(left + h, end), panels.factor);
            if (h <= limit) {
                break;
            }
            h *= 0.5;
        }
        double right = left + Math.max(h, 16 * Math.ulp(left));
        return right >= end || end - right < 1e-3 * h ? end : right;
    }

    /**
     * Panel width {@code factor / sqrt(K(x))}. Within about 1e-154 of a Beta support end with a
     * non-integer shape the squared distance underflows and K is infinite; the width is then taken in the
     * form {@code factor * d / sqrt(C)}, with {@code d} the distance to the nearest such end and
     * {@code C} the sum of the end coefficients there ({@link ExactArm#endCoefficient}), the same geometric
     * panels that {@code K ~ C / d^2} gives further out. Before this, the panels shrank to a few ulps and
     * integration gave up (issue 14: prior shapes below about 0.15).
     */
    private static double width(List<ExactArm> arms, double[] from, double[] to, boolean[] which, double x,
                                double factor) {
        double k = curvature(arms, from, to, which, x);
        if (!Double.isInfinite(k)) {
            return factor / Math.sqrt(k);
        }
        double distance = Double.POSITIVE_INFINITY;
        double coefficient = 0;
        for (ExactArm arm : arms) {
            if (arm.active(x)) {
                distance = Math.min(distance, arm.endDistance(x));
                coefficient += arm.endCoefficient(x);
            }
        }
        return factor * distance / Math.sqrt(Math.max(coefficient, 0.25));
    }

    /** Sum of the curvatures of the log factors that vary at {@code x}. */
    private static double curvature(List<ExactArm> arms, double[] from, double[] to, boolean[] which,
                                    double x) {
        double own = 0;
        double others = 0;
        for (int j = 0; j < arms.size(); j++) {
            ExactArm arm = arms.get(j);
            if (arm.active(x)) {
                others += arm.cdfCurvature(x);
                if (which[j] && x >= from[j] && x <= to[j]) {
                    own = Math.max(own, arm.curvature(x));
                }
            }
        }
        return own + others;
    }

    /**
     * Per-arm log-sum-exp of weighted terms (weights included in the logs, since far in a heavy tail a
     * tiny integrand on a huge panel still counts), rescaled to a running maximum.
     */
    static final class Accumulator {
        private final double[] max;
        private final double[] sum;

        Accumulator(int n) {
            max = new double[n];
            sum = new double[n];
            Arrays.fill(max, Double.NEGATIVE_INFINITY);
        }

        double max(int i) {
            return max[i];
        }

        void add(int i, double logTerm) {
            if (logTerm <= max[i]) {
                if (logTerm > max[i] - NEGLIGIBLE) {
                    sum[i] += StrictMath.exp(logTerm - max[i]);
                }
            } else if (logTerm > Double.NEGATIVE_INFINITY) {
                sum[i] = sum[i] * StrictMath.exp(max[i] - logTerm) + 1;
                max[i] = logTerm;
            }
        }

        /** The log of the sum so far ({@code -infinity} while it is empty). */
        double logValue(int i) {
            return sum[i] == 0 ? Double.NEGATIVE_INFINITY : max[i] + StrictMath.log(sum[i]);
        }

        double value(int i) {
            return sum[i] == 0 ? 0 : StrictMath.exp(max[i]) * sum[i];
        }
    }
}
