package dev.runoff.topology;

import static org.junit.jupiter.api.Assertions.assertEquals;

import java.util.List;
import org.junit.jupiter.api.Test;

/** The counting rule of guardrail signals ({@link UnitCounting#signal}). */
class UnitSignalTest {

    private static final UnitState UNIT = new UnitState("a", 1, true, 1_000, 1_000, 1, 0, 500, false, 1_000);

    @Test
    void aSignalWithinTheWindowMarksTheUnitOnceAndReachesTheCountWhenTheWindowCloses() {
        UnitState marked = UnitCounting.signal(UNIT, "payment-failed", 1_200, 1_200).unit();
        UnitState twice = UnitCounting.signal(marked, "payment-failed", 1_300, 1_300).unit();
        assertEquals(List.of("payment-failed"), twice.signals());
        assertEquals(List.of("payment-failed"), UnitCounting.close(twice, 1_500, 1_500).count().signals());
    }

    @Test
    void aSignalOutsideTheWindowOrAfterTheCountIsRefused() {
        assertEquals(UnitCounting.Verdict.OUTSIDE_WINDOW, UnitCounting.signal(UNIT, "s", 1_501, 1_501).verdict());
        UnitState counted = UnitCounting.close(UNIT, 1_500, 1_500).unit();
        assertEquals(UnitCounting.Verdict.LATE, UnitCounting.signal(counted, "s", 1_400, 1_600).verdict());
    }
}
