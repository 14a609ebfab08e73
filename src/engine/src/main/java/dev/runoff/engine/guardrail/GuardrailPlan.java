package dev.runoff.engine.guardrail;

import dev.runoff.engine.core.Checks;
import java.util.Objects;

/**
 * How many units a guardrail needs before an arm as good as the reference can PASS it: the smallest n such
 * that {@link MarginCheck} returns PASS when both the arm and the reference have n counted units with the
 * reference's rate, at the expected hit count {@code round(n * rate)}.
 *
 * <p>A planning figure at the expected counts, not a guarantee: with random counts an arm at exactly the
 * reference's rate passes by then in roughly half the experiments, and a better arm sooner. The PASS
 * condition gets easier as n grows (both intervals shrink around the same rate), so the smallest n is found by
 * doubling and then bisection.
 */
public final class GuardrailPlan {

    /** Largest number of units searched; beyond it the margin is reported as out of reach. */
    public static final long MAX_UNITS = 1L << 40;

    private GuardrailPlan() {
    }

    /**
     * Units per arm (arm and reference alike) before an arm with the reference's {@code rate} passes.
     *
     * @return the number of units, or -1 when not even {@link #MAX_UNITS} suffice (a margin of 0)
     * @throws IllegalArgumentException when {@code rate} is outside (0, 1) or the margin or alpha is invalid
     */
    public static long unitsToPass(double rate, double margin, Direction direction, double alpha) {
        Checks.inOpenRange("rate", rate, 0, 1);
        Objects.requireNonNull(direction, "direction");
        MarginCheck.check(new MarginCheck.Counts(0, 0), new MarginCheck.Counts(0, 0), direction, margin, alpha);
        if (!passes(MAX_UNITS, rate, margin, direction, alpha)) {
            return -1;
        }
        long high = 1;
        while (!passes(high, rate, margin, direction, alpha)) {
            high *= 2;
        }
        long low = high / 2;
        while (high - low > 1) {
            long mid = low + (high - low) / 2;
            if (passes(mid, rate, margin, direction, alpha)) {
                high = mid;
            } else {
                low = mid;
            }
        }
        return high;
    }

    private static boolean passes(long units, double rate, double margin, Direction direction, double alpha) {
        MarginCheck.Counts counts = new MarginCheck.Counts(units, Math.round(units * rate));
        return MarginCheck.check(counts, counts, direction, margin, alpha).outcome() == MarginCheck.Outcome.PASS;
    }
}
