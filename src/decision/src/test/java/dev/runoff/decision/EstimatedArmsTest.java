package dev.runoff.decision;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;

import dev.runoff.records.avro.ArmState;
import dev.runoff.testkit.TestDefinitions;
import java.util.List;
import org.junit.jupiter.api.Test;

class EstimatedArmsTest {

    @Test
    void suspendedArmsAreLeftOutWhileTwoOthersRemain() {
        assertEquals(List.of(0, 2, 3), EstimatedArms.of(new boolean[] {false, true, false, false}));
        assertEquals(List.of(0, 1), EstimatedArms.of(new boolean[] {false, false}));
    }

    @Test
    void withFewerThanTwoLeftEveryArmIsEstimated() {
        assertEquals(List.of(0, 1, 2), EstimatedArms.of(new boolean[] {true, false, true}));
        assertEquals(List.of(0, 1), EstimatedArms.of(new boolean[] {true, true}));
    }

    @Test
    void aRecordsArmIsSuspendedWhenItNamesTheGuardrail() {
        ArmState kept = new Evaluator(2_000).evaluate(ExperimentState.start(TestDefinitions.bernoulli("layout",
                "classic", "wide")), 1_700_000_000_000L).decision().getArms().get(0);
        ArmState held = ArmState.newBuilder(kept).setSuspendedBy("failed-payments").build();
        assertArrayEquals(new boolean[] {false, true}, EstimatedArms.suspended(List.of(kept, held)));
    }
}
