package dev.runoff.cli;

import com.fasterxml.jackson.databind.node.ObjectNode;
import dev.runoff.engine.guardrail.Direction;
import dev.runoff.engine.guardrail.GuardrailPlan;
import java.util.Locale;

/**
 * The guardrail line of {@code plan}: the units per arm before an arm with the control's rate passes a
 * guardrail of the given margin ({@link GuardrailPlan}, at the expected counts).
 *
 * @param rate      the control's guardrail rate
 * @param margin    the guardrail's relative margin
 * @param direction which way the rate is bad
 * @param alpha     the guardrail's error level
 * @param units     units per arm, or -1 when out of reach
 */
record GuardrailFigure(double rate, double margin, Direction direction, double alpha, long units) {

    /** Computes the units. */
    static GuardrailFigure of(double rate, double margin, Direction direction, double alpha) {
        return new GuardrailFigure(rate, margin, direction, alpha,
                GuardrailPlan.unitsToPass(rate, margin, direction, alpha));
    }

    String text() {
        String what = String.format(Locale.ROOT, "Guardrail (%s, margin %s, alpha %s) on a control rate of %s: ",
                Spelling.of(direction), Posteriors.number(margin), Posteriors.number(alpha), Posteriors.number(rate));
        return what + (units < 0 ? "out of reach (a margin of 0 is never passed)"
                : String.format(Locale.ROOT, "%,d units per arm (arm and control alike) before an arm as good as the"
                        + " control passes, at the expected counts (about half the runs pass by then)", units))
                + System.lineSeparator();
    }

    void json(ObjectNode root) {
        root.putObject("guardrail").put("rate", rate).put("margin", margin).put("direction", Spelling.of(direction))
                .put("alpha", alpha).put("unitsPerArm", units < 0 ? null : units);
    }
}
