package dev.runoff.engine.special;

/** Elementary functions in log space that avoid cancellation. */
public final class LogMath {
    private static final double LN2 = 0.6931471805599453;

    private LogMath() {
    }

    /**
     * {@code log(1 - exp(t))} for {@code t <= 0}, accurate over the whole range.
     *
     * <p>Design: Maechler (2012), "Accurately Computing log(1 - exp(-|a|))": use {@code log(-expm1(t))}
     * for {@code t > -ln 2} and {@code log1p(-exp(t))} below, so neither branch cancels.
     *
     * @param t a log-probability, {@code <= 0}
     * @return {@code log(1 - exp(t))}; {@code -infinity} at {@code t = 0}; NaN for {@code t > 0}
     */
    public static double log1mExp(double t) {
        if (t > -LN2) {
            return StrictMath.log(-StrictMath.expm1(t));
        }
        return StrictMath.log1p(-StrictMath.exp(t));
    }
}
