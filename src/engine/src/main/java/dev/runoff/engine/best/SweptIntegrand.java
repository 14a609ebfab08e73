package dev.runoff.engine.best;

import dev.runoff.engine.posterior.BetaPosterior;
import dev.runoff.engine.special.SweptBeta;
import java.util.List;

/**
 * Engine version 1.6's evaluation of the log integrand {@code phi_i(x) = log f_i(x) + sum_{j != i} log F_j(x)}
 * along a sweep of {@link PeakQuadrature}: the own density and each other arm's distribution function are
 * {@link SweptBeta} sweeps, held as the log at an anchor and a ratio, so a point costs the arms' Taylor steps,
 * a product of their ratios and one logarithm (engine 1.5's {@link PeakIntegrand#sweep} takes an exponential
 * and several logarithms per arm and point). An arm whose distribution function exceeds
 * {@code 1 - }{@value #SATURATED} is left out from there on: {@code F_j} increases, so the integrand changes by
 * less than that relative share (engine 1.5 left an arm out from {@code 1 - 1e-17}; both are far below the
 * integration's tolerance of 2e-8). Not thread-safe: one instance per sweep.
 */
final class SweptIntegrand implements LogIntegrand {
    /** An arm whose distribution function's upper tail falls below this is left out of later points. */
    static final double SATURATED = 1e-15;
    /** A running product of ratios beyond {@code [1 / PRODUCT_RANGE, PRODUCT_RANGE]} is folded into the log. */
    private static final double PRODUCT_RANGE = 1e100;

    private final SweptBeta own;
    private final SweptBeta[] others;
    private final boolean[] saturated;

    /** The integrand of arm {@code own} over {@code arms}. */
    SweptIntegrand(List<BetaPosterior> arms, int own) {
        this.own = SweptBeta.density(arms.get(own).incompleteBeta());
        this.others = new SweptBeta[arms.size() - 1];
        this.saturated = new boolean[others.length];
        int k = 0;
        for (int j = 0; j < arms.size(); j++) {
            if (j != own) {
                others[k++] = SweptBeta.lowerTail(arms.get(j).incompleteBeta());
            }
        }
    }

    /** A fresh sweep of the integrand that {@code search} evaluates. */
    static SweptIntegrand of(PeakIntegrand search) {
        return new SweptIntegrand(search.arms(), search.own());
    }

    @Override
    public double sweep(double x) {
        double y = 1 - x;
        own.moveTo(x, y);
        double logs = own.logAnchor();
        double product = own.ratio();
        for (int j = 0; j < others.length; j++) {
            if (!saturated[j]) {
                SweptBeta cdf = others[j];
                cdf.moveTo(x, y);
                logs += cdf.logAnchor();
                product *= cdf.ratio();
                saturated[j] = cdf.value() > 1 - SATURATED;
                if (product > PRODUCT_RANGE || product < 1 / PRODUCT_RANGE) {
                    logs += StrictMath.log(product);
                    product = 1;
                }
            }
        }
        return logs + StrictMath.log(product);
    }
}
