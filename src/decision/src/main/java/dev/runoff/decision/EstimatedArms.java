package dev.runoff.decision;

import dev.runoff.records.avro.ArmState;
import java.util.ArrayList;
import java.util.List;

/**
 * The arms a decision's probabilities of being best are estimated for: every arm except those a guardrail
 * suspended, as long as at least two remain (otherwise every arm). The job narrows its evaluation to these
 * arms, and whoever recomputes a record's P(best) (the audit's exact cross-check) must use the same ones.
 */
public final class EstimatedArms {

    private EstimatedArms() {
    }

    /** The indices of the arms estimated, in order, given which arms are suspended. */
    public static List<Integer> of(boolean[] suspended) {
        List<Integer> kept = new ArrayList<>();
        for (int i = 0; i < suspended.length; i++) {
            if (!suspended[i]) {
                kept.add(i);
            }
        }
        if (kept.size() >= 2) {
            return kept;
        }
        List<Integer> all = new ArrayList<>(suspended.length);
        for (int i = 0; i < suspended.length; i++) {
            all.add(i);
        }
        return all;
    }

    /** Per arm of a decision record, whether a guardrail suspended it ({@code suspendedBy} set). */
    public static boolean[] suspended(List<ArmState> arms) {
        boolean[] out = new boolean[arms.size()];
        for (int i = 0; i < out.length; i++) {
            out[i] = arms.get(i).getSuspendedBy() != null;
        }
        return out;
    }
}
