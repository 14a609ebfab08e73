package dev.runoff.engine.best;

/**
 * The log integrand of one arm's probability of being best, evaluated along one sweep of {@link PeakQuadrature}
 * (points visited in increasing order). Each engine version's integration names how it evaluates it.
 */
interface LogIntegrand {

    /** {@code phi(x)} for {@code 0 < x < 1}, at points visited in increasing order. */
    double sweep(double x);
}
