package dev.runoff.engine.allocation;

import dev.runoff.engine.core.Checks;
import java.util.List;
import java.util.Objects;

/**
 * Guards that turn a rule's weights into serving weights. They apply in this order:
 * <ol>
 *   <li><b>warm-up</b>: while any arm has fewer than {@code warmUpTrials} trials, the rule's weights are
 *       replaced by equal weights;</li>
 *   <li><b>control share</b>: the control arm gets exactly its share {@code c}; the other arms share
 *       {@code 1 - c} in proportion to their weights (equally if those are all 0);</li>
 *   <li><b>floor</b>: every arm other than the control is raised to at least {@code floor}; arms above
 *       the floor are scaled down by one common factor, so their ratios are kept (the control already has
 *       {@code c >= floor});</li>
 *   <li><b>cap</b>: with previous weights, the result moves from them by at most {@code maxChange} per
 *       arm. The previous weights first go through the control share and floor (steps 2-3), and the result
 *       is the point on the segment from them to the target that is closest to the target within the cap.
 *       Being a mix of two vectors that satisfy the control share and the floor, it satisfies them too;</li>
 *   <li>the weights are divided by their sum, so rounding never leaves them off 1.</li>
 * </ol>
 * The warm-up therefore yields equal weights only without a control arm; with one, the control keeps its
 * share during warm-up too.
 *
 * @param warmUpTrials minimum trials per arm before the rule's weights are used; 0 disables the warm-up
 * @param floor        minimum weight of every arm, in [0, 1]; 0 disables the floor
 * @param control      the control arm and its fixed share, or {@code null} for none
 * @param maxChange    largest change of any weight per period, in (0, 1]; 1 means no cap
 */
public record Guards(long warmUpTrials, double floor, ControlShare control, double maxChange) {

    /** No guards at all. */
    public static final Guards NONE = new Guards(0, 0.0, null, 1.0);

    /** Validates every field; messages name the field and value. */
    public Guards {
        Checks.nonNegative("warm-up trials", warmUpTrials);
        Checks.inClosedRange("floor", floor, 0, 1);
        if (!(maxChange > 0 && maxChange <= 1)) {
            throw new IllegalArgumentException("max change must be in (0, 1], got " + maxChange);
        }
        if (control != null && control.share() < floor) {
            throw new IllegalArgumentException("control share (" + control.share()
                    + ") must not be below the floor (" + floor + ")");
        }
    }

    /** These guards with a different warm-up. */
    public Guards withWarmUp(long trials) {
        return new Guards(trials, floor, control, maxChange);
    }

    /** These guards with a different floor. */
    public Guards withFloor(double newFloor) {
        return new Guards(warmUpTrials, newFloor, control, maxChange);
    }

    /** These guards with a control arm that gets exactly {@code share}. */
    public Guards withControl(String arm, double share) {
        return new Guards(warmUpTrials, floor, new ControlShare(arm, share), maxChange);
    }

    /** These guards with a cap on the per-period change of each weight. */
    public Guards withMaxChange(double cap) {
        return new Guards(warmUpTrials, floor, control, cap);
    }

    /**
     * Applies the guards, in the order given above, to a rule's weights.
     *
     * @param ruleWeights the rule's weights in arm order: non-negative, summing to 1 (within 1e-9)
     * @param arms        arm names in the same order (to find the control arm)
     * @param trials      trials per arm in the same order (for the warm-up)
     * @param previous    the weights of the previous period in the same order, or {@code null} (no cap)
     * @return non-negative weights summing to 1, with the guards that changed them
     * @throws IllegalArgumentException if the guards cannot be met with this many arms, the control arm is
     *                                  not among {@code arms}, or an input vector is malformed
     */
    public GuardedWeights apply(double[] ruleWeights, List<String> arms, long[] trials, double[] previous) {
        return GuardSteps.apply(this, ruleWeights, arms, trials, previous);
    }

    /**
     * Throws unless these guards can be met with {@code arms} arms: {@code floor * arms <= 1}, and with a
     * control arm {@code share + floor * (arms - 1) <= 1}.
     */
    public void checkFeasible(int arms) {
        if (floor * arms > 1) {
            throw new IllegalArgumentException("floor " + floor + " times " + arms + " arms = " + floor * arms
                    + " exceeds 1");
        }
        if (control != null && control.share() + floor * (arms - 1) > 1) {
            throw new IllegalArgumentException("control share " + control.share() + " plus floor " + floor
                    + " for each of the other " + (arms - 1) + " arms exceeds 1");
        }
    }

    /**
     * A control arm with a fixed share of traffic.
     *
     * @param arm   the control arm's name
     * @param share its share, in [0, 1]
     */
    public record ControlShare(String arm, double share) {
        /** Validates both fields. */
        public ControlShare {
            Objects.requireNonNull(arm, "control arm");
            if (arm.isBlank()) {
                throw new IllegalArgumentException("control arm name must not be blank");
            }
            Checks.inClosedRange("control share", share, 0, 1);
        }
    }
}
