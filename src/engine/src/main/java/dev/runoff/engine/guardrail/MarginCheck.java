package dev.runoff.engine.guardrail;

import dev.runoff.engine.core.Checks;
import java.util.Objects;

/**
 * The anytime-valid guardrail test of one arm against its reference arm: is the arm's rate worse than the
 * reference's by more than a relative margin m?
 *
 * <p>Each arm gets a {@link RateSequence} at level alpha / 2. For "higher is worse" the arm FAILS when its
 * lower bound exceeds the reference's upper bound times (1 + m), and PASSES when its upper bound is below
 * the reference's lower bound times (1 + m); "lower is worse" mirrors this with (1 - m): FAIL when the arm's
 * upper bound is below the reference's lower bound times (1 - m), PASS when its lower bound is above the
 * reference's upper bound times (1 - m). Otherwise the test is OPEN.
 *
 * <p>Why a FAIL errs with probability at most alpha, at any pass and under any adaptive allocation: if the
 * arm's true rate is within the margin (p_arm <= (1 + m) p_ref), a FAIL needs lower_arm > p_arm or
 * upper_ref < p_ref, i.e. one of the two sequences missing its rate at some time, each of probability at
 * most alpha / 2 (a union bound). A PASS errs (p_arm >= (1 + m) p_ref) under the same event, so a PASS
 * is also wrong with probability at most alpha. Units enter only once their outcome is known, so the
 * sequences see independent Bernoulli draws of each arm's rate whatever share the allocation gives it.
 */
public final class MarginCheck {

    private MarginCheck() {
    }

    /** What the test concluded. */
    public enum Outcome {
        /** Not enough data either way. */
        OPEN,
        /** The arm is within the margin (with confidence 1 - alpha). */
        PASS,
        /** The arm is worse than the reference by more than the margin (with confidence 1 - alpha). */
        FAIL
    }

    /**
     * One arm's units and hits (units with at least one guardrail event).
     *
     * @param units units counted
     * @param hits  those of them with the event, in [0, units]
     */
    public record Counts(long units, long hits) {
        /** Checks {@code 0 <= hits <= units}. */
        public Counts {
            Checks.nonNegative("units", units);
            if (hits < 0 || hits > units) {
                throw new IllegalArgumentException("hits must be in [0, units=" + units + "], got " + hits);
            }
        }
    }

    /**
     * One arm's units and the sum of their observations, each in [0, 1]: for a value guardrail, each unit's
     * capped value divided by the cap (see {@link RateSequence#meanBounds(long, double, double)}).
     *
     * @param units units counted
     * @param total sum of their observations, a finite number in [0, units]
     */
    public record Totals(long units, double total) {
        /** Checks {@code 0 <= total <= units}. */
        public Totals {
            Checks.nonNegative("units", units);
            if (!(total >= 0 && total <= units)) {
                throw new IllegalArgumentException("total must be in [0, units=" + units + "], got " + total);
            }
        }
    }

    /**
     * The test's result: the outcome, both arms' bounds, and the comparison behind the outcome (the FAIL
     * comparison when it failed, else the PASS comparison).
     *
     * @param outcome   OPEN, PASS or FAIL
     * @param arm       the arm's confidence interval at level alpha / 2
     * @param reference the reference's confidence interval at level alpha / 2
     * @param statistic the arm's bound compared
     * @param threshold the reference's bound times the margin factor it was compared with
     */
    public record Result(Outcome outcome, RateSequence.Bounds arm, RateSequence.Bounds reference, double statistic,
                         double threshold) {
    }

    /**
     * Tests {@code arm} against {@code reference}.
     *
     * @param margin relative margin, >= 0 (and < 1 for {@link Direction#LOWER_IS_WORSE})
     * @param alpha  error level of the test, in (0, 1)
     */
    public static Result check(Counts arm, Counts reference, Direction direction, double margin, double alpha) {
        return check(new Totals(arm.units(), arm.hits()), new Totals(reference.units(), reference.hits()),
                direction, margin, alpha);
    }

    /**
     * Tests {@code arm} against {@code reference} on the means of observations in [0, 1]; with 0/1
     * observations it is {@link #check(Counts, Counts, Direction, double, double)}. The error argument of the
     * class comment holds unchanged, the sequences being valid for any observations in [0, 1].
     *
     * @param margin relative margin, >= 0 (and < 1 for {@link Direction#LOWER_IS_WORSE})
     * @param alpha  error level of the test, in (0, 1)
     */
    public static Result check(Totals arm, Totals reference, Direction direction, double margin, double alpha) {
        Objects.requireNonNull(direction, "direction");
        Checks.nonNegative("margin", margin);
        if (direction == Direction.LOWER_IS_WORSE && margin >= 1) {
            throw new IllegalArgumentException("margin must be < 1 when lower is worse, got " + margin);
        }
        Checks.inOpenRange("alpha", alpha, 0, 1);
        RateSequence.Bounds a = RateSequence.meanBounds(arm.units(), arm.total(), alpha / 2);
        RateSequence.Bounds r = RateSequence.meanBounds(reference.units(), reference.total(), alpha / 2);
        return direction == Direction.HIGHER_IS_WORSE ? higherIsWorse(a, r, 1 + margin)
                : lowerIsWorse(a, r, 1 - margin);
    }

    private static Result higherIsWorse(RateSequence.Bounds a, RateSequence.Bounds r, double factor) {
        double failAt = r.upper() * factor;
        if (a.lower() > failAt) {
            return new Result(Outcome.FAIL, a, r, a.lower(), failAt);
        }
        double passAt = r.lower() * factor;
        return new Result(a.upper() < passAt ? Outcome.PASS : Outcome.OPEN, a, r, a.upper(), passAt);
    }

    private static Result lowerIsWorse(RateSequence.Bounds a, RateSequence.Bounds r, double factor) {
        double failAt = r.lower() * factor;
        if (a.upper() < failAt) {
            return new Result(Outcome.FAIL, a, r, a.upper(), failAt);
        }
        double passAt = r.upper() * factor;
        return new Result(a.lower() > passAt ? Outcome.PASS : Outcome.OPEN, a, r, a.lower(), passAt);
    }
}
