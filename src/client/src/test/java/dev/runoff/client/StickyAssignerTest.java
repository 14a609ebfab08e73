package dev.runoff.client;

import static dev.runoff.client.ControlRecords.NOW;
import static dev.runoff.client.ControlRecords.VALID_UNTIL;
import static dev.runoff.client.ControlRecords.avro;
import static dev.runoff.client.ControlRecords.running;
import static dev.runoff.client.ControlRecords.stopped;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertNotEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.HashMap;
import java.util.Map;
import java.util.function.UnaryOperator;
import org.junit.jupiter.api.Test;

/** Returning units keep their arm while it has weight; they move once when it has none. */
class StickyAssignerTest {
    private static final int UNITS = 20_000;

    private final MutableClock clock = new MutableClock(NOW);

    private AllocationTable table(UnaryOperator<PickPolicy.Builder> policy) {
        return AllocationTable.create(policy.apply(PickPolicy.builder("fallback")).build(), clock);
    }

    @Test
    void returningUnitsKeepTheirArmAcrossWeightChangesWhileItHasWeight() {
        AllocationTable table = table(p -> p);
        StickyAssigner sticky = StickyAssigner.over(table, UNITS);
        table.apply("e", avro(running("e", 1, "a", 0.5, "b", 0.3, "c", 0.2)));
        Map<String, String> first = serveAll(sticky);
        // large changes: the table's own draw moves many of these units (checked below), the assigner none
        table.apply("e", avro(running("e", 2, "a", 0.05, "b", 0.05, "c", 0.9)));
        table.apply("e", avro(running("e", 3, "a", 0.9, "b", 0.05, "c", 0.05)));
        int tableMoved = 0;
        for (Map.Entry<String, String> unit : first.entrySet()) {
            assertEquals(unit.getValue(), sticky.assign("e", unit.getKey()).arm(), unit.getKey());
            tableMoved += unit.getValue().equals(table.pick("e", unit.getKey())) ? 0 : 1;
        }
        assertTrue(tableMoved > UNITS / 10, "the table alone moved " + tableMoved + " units: the test needs some");
        assertEquals(tableMoved, sticky.keptPicks());
    }

    @Test
    void unitsOfAnArmSwitchedOffMoveOnceAndStayOnTheirNewArm() {
        AllocationTable table = table(p -> p);
        StickyAssigner sticky = StickyAssigner.over(table, UNITS);
        table.apply("e", avro(running("e", 1, "a", 0.5, "b", 0.5)));
        Map<String, String> first = serveAll(sticky);
        table.apply("e", avro(running("e", 2, "a", 0.0, "b", 0.3, "c", 0.7)));
        Map<String, String> second = serveAll(sticky);
        table.apply("e", avro(running("e", 3, "a", 0.5, "b", 0.25, "c", 0.25)));
        Map<String, String> third = serveAll(sticky);
        for (String unit : first.keySet()) {
            if (first.get(unit).equals("a")) {
                assertNotEquals("a", second.get(unit), unit + " left the arm switched off");
            } else {
                assertEquals(first.get(unit), second.get(unit), unit + " kept its arm");
            }
            assertEquals(second.get(unit), third.get(unit), unit + " moved once, not back when a returns");
        }
    }

    @Test
    void afterStopThePolicyDecides() {
        AllocationTable toWinner = table(p -> p.afterStop(StoppedPick.WINNER));
        StickyAssigner sticky = StickyAssigner.over(toWinner, UNITS);
        toWinner.apply("e", avro(running("e", 1, "a", 0.5, "b", 0.5)));
        serveAll(sticky);
        toWinner.apply("e", avro(stopped("e", 2, "b", "a", 0.5, "b", 0.5)));
        assertTrue(serveAll(sticky).values().stream().allMatch("b"::equals), "WINNER: every unit gets the winner");

        AllocationTable recordWeights = table(p -> p);
        StickyAssigner kept = StickyAssigner.over(recordWeights, UNITS);
        recordWeights.apply("e", avro(running("e", 1, "a", 0.5, "b", 0.5)));
        Map<String, String> before = serveAll(kept);
        recordWeights.apply("e", avro(stopped("e", 2, "b", "a", 0.2, "b", 0.8)));
        assertEquals(before, serveAll(kept), "RECORD_WEIGHTS: arms that keep weight keep their units");
    }

    @Test
    void staleRecordsFollowTheFallback() {
        AllocationTable uniform = table(p -> p);
        StickyAssigner sticky = StickyAssigner.over(uniform, UNITS);
        uniform.apply("e", avro(running("e", 1, "a", 0.9, "b", 0.1)));
        Map<String, String> before = serveAll(sticky);
        clock.set(VALID_UNTIL + 1);
        assertEquals(before, serveAll(sticky), "UNIFORM fallback: every arm has weight, nobody moves");

        clock.set(NOW);
        AllocationTable defaultArm = table(p -> p.staleFallback(StaleFallback.DEFAULT_ARM));
        StickyAssigner fallback = StickyAssigner.over(defaultArm, UNITS);
        defaultArm.apply("e", avro(running("e", 1, "a", 0.9, "b", 0.1)));
        serveAll(fallback);
        clock.set(VALID_UNTIL + 1);
        ArmAssignment stale = fallback.assign("e", "unit-1");
        assertEquals("fallback", stale.arm());
        assertFalse(stale.drawn());
    }

    @Test
    void theMemoryIsBoundedAndForgetsTheLeastRecentlyServed() {
        AllocationTable table = table(p -> p);
        StickyAssigner sticky = StickyAssigner.over(table, 100);
        table.apply("e", avro(running("e", 1, "a", 0.5, "b", 0.5)));
        Map<String, String> first = serveAll(sticky);
        assertEquals(100, sticky.remembered());
        table.apply("e", avro(running("e", 2, "a", 0.01, "b", 0.99)));
        long moved = 0;
        for (int i = 0; i < UNITS - 100; i++) {
            String unit = "unit-" + i;
            moved += first.get(unit).equals(sticky.assign("e", unit).arm()) ? 0 : 1;
        }
        // forgotten units take the table's draw: about half of the units on arm a (0.5 of all) move to b
        assertTrue(moved > UNITS / 4, "forgotten units moved: " + moved);
        assertThrows(IllegalArgumentException.class, () -> StickyAssigner.over(table, 0));
    }

    @Test
    void unknownExperimentsAndMissingKeysAreTheTablesAnswer() {
        AllocationTable table = table(p -> p);
        StickyAssigner sticky = StickyAssigner.over(table, 10);
        assertFalse(sticky.assign("nope", "u").drawn());
        assertFalse(sticky.assign(null, "u").drawn());
        table.apply("e", avro(running("e", 1, "a", 0.5, "b", 0.5)));
        assertFalse(sticky.assign("e", null).drawn());
        assertEquals(0, sticky.remembered());
    }

    private static Map<String, String> serveAll(StickyAssigner sticky) {
        Map<String, String> arms = new HashMap<>();
        for (int i = 0; i < UNITS; i++) {
            ArmAssignment a = sticky.assign("e", "unit-" + i);
            assertTrue(a.drawn());
            arms.put("unit-" + i, a.arm());
        }
        return arms;
    }
}
