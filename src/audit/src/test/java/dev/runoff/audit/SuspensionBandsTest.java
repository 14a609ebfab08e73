package dev.runoff.audit;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.runoff.records.avro.DecisionRecord;
import java.util.List;
import org.junit.jupiter.api.Test;

/** `audit report` draws the periods in which a guardrail suspended an arm. */
class SuspensionBandsTest {

    @Test
    void theChartShadesEachRunOfSuspendedDecisionsOfAnArm() {
        List<DecisionRecord> records = GuardrailVerificationTest.chain();
        Timeline timeline = Timeline.of("ferry-layout", records);
        long first = records.stream().filter(r -> r.getArms().get(1).getSuspendedBy() != null).findFirst()
                .orElseThrow().getSequence();
        String svg = SvgChart.of(timeline);
        assertTrue(svg.contains("<g class=\"suspended\">"), svg);
        assertTrue(svg.contains("wide suspended by guardrail failed-payments from decision " + first), svg);
        assertEquals(1, svg.split("fill-opacity=\"0.18\"", -1).length - 1, "one run, one band");
    }

    @Test
    void withoutSuspensionsNothingIsDrawn() {
        List<DecisionRecord> records = SimulatedJob.run(SimulatedJob.definition("plain", List.of("a", "b"), 0),
                new double[] {0.1, 0.2}, 3, 200, 1);
        assertFalse(SvgChart.of(Timeline.of("plain", records)).contains("class=\"suspended\""));
    }
}
