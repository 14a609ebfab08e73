package dev.runoff.demo;

import dev.runoff.records.avro.ArmState;
import dev.runoff.records.avro.DecisionRecord;
import dev.runoff.records.avro.GuardrailState;
import java.util.ArrayList;
import java.util.List;
import java.util.Locale;

/** What the demo says about guardrails: the arms a decision suspended, and why. */
final class DemoGuardrails {

    private DemoGuardrails() {
    }

    /** The suspended arms of {@code d}, in arm order. */
    static List<ArmState> suspended(DecisionRecord d) {
        return d == null ? List.of() : d.getArms().stream().filter(a -> a.getSuspendedBy() != null).toList();
    }

    /**
     * One line per suspended arm, e.g. {@code compact-list suspended by failed-payments: its rate is at least
     * 3.61% > 2.87% (the reference's at most, times 1 + margin)}.
     */
    static List<String> lines(DecisionRecord d) {
        List<String> lines = new ArrayList<>();
        for (ArmState arm : suspended(d)) {
            GuardrailState g = failed(arm);
            lines.add(String.format(Locale.ROOT, "%s suspended by %s: its rate is at least %.2f%% > %.2f%% (the"
                    + " reference's at most, times 1 + margin); %,d of %,d counted visitors", arm.getArm(),
                    arm.getSuspendedBy(), 100 * g.getStatistic(), 100 * g.getThreshold(), g.getHits(),
                    g.getCounted()));
        }
        return lines;
    }

    /** The guardrail entry that suspended {@code arm}. */
    static GuardrailState failed(ArmState arm) {
        return arm.getGuardrails().stream().filter(g -> g.getGuardrail().equals(arm.getSuspendedBy())).findFirst()
                .orElseThrow();
    }
}
