package dev.runoff.topology;

import static org.junit.jupiter.api.Assertions.assertEquals;

import org.junit.jupiter.api.Test;

/** {@link UnitCounting#closeTime}: the earlier of wall clock and stream time, the wall clock once idle. */
class UnitCloseTimeTest {

    private static final long IDLE = 5_000;

    @Test
    void aLaggingTaskClosesByItsStreamTime() {
        assertEquals(1_000, UnitCounting.closeTime(60_000, 1_000, 59_990, IDLE));
    }

    @Test
    void aStreamTimeAheadOfTheWallClockIsCappedByIt() {
        assertEquals(60_000, UnitCounting.closeTime(60_000, 90_000, 59_990, IDLE));
    }

    @Test
    void anIdleTaskClosesByTheWallClockAndOneWithoutRecordsWaitsForTheIdleTime() {
        assertEquals(60_000, UnitCounting.closeTime(60_000, 1_000, 60_000 - IDLE, IDLE));
        assertEquals(-1, UnitCounting.closeTime(60_000, -1, 60_000 - IDLE + 1, IDLE));
    }

    @Test
    void aUnitClosesOnlyWhenTheCloseTimeReachesItsWindowEnd() {
        UnitState unit = UnitCounting.expose(null, "a", 1, true, 1_000, 500, 1_000).unit();
        assertEquals(UnitCounting.Count.NONE, UnitCounting.close(unit, 1_499, 9_000).count());
        assertEquals(new UnitCounting.Count(1, 0, -1), UnitCounting.close(unit, 1_500, 9_000).count());
    }
}
