package dev.runoff.audit;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.runoff.audit.SampleRatio.Outcome;
import dev.runoff.audit.SampleRatio.Period;
import java.util.ArrayList;
import java.util.List;
import org.junit.jupiter.api.Test;

class SampleRatioAcrossPeriodsTest {

    private static final SampleRatio TEST = new SampleRatio(0.001);

    @Test
    void aPeriodFlaggedAloneButNotAtItsHolmLevelPassesWithANote() {
        // Three tested periods at alpha 0.001: the smallest p-value, 0.0005, meets Holm's level 0.001/3
        // (Holm 1979), which it does not undercut.
        List<Period> judged = TEST.acrossPeriods(List.of(tested(1, 0.0005), tested(2, 0.2), tested(3, 0.9)));
        assertEquals(Outcome.PASSED, judged.get(0).outcome());
        assertEquals(0.001 / 3, judged.get(0).level(), 1e-18);
        assertTrue(judged.get(0).note().contains("not below Holm's level 0.0003333 over the experiment's 3 tested"),
                judged.get(0).note());
        assertEquals(Outcome.PASSED, judged.get(1).outcome());
        assertNull(judged.get(1).note());
    }

    @Test
    void aPeriodBelowItsHolmLevelStaysFlagged() {
        List<Period> judged = TEST.acrossPeriods(List.of(tested(1, 0.0002), tested(2, 0.2), tested(3, 0.9)));
        assertEquals(Outcome.FLAGGED, judged.get(0).outcome());
        assertEquals("exposures do not follow the weights", judged.get(0).note());
    }

    @Test
    void skippedAndStructuralFlagsAreKeptAndNotCountedAmongTheTestedPeriods() {
        List<Period> periods = new ArrayList<>();
        periods.add(null);
        periods.add(Period.skipped(1, 2, null, null, "no exposures"));
        periods.add(new Period(2, 3, new long[] {3, 0}, new double[] {1, 0}, null, 1, null, null, null, null, null,
                null, null, Outcome.FLAGGED, "arm 'b' received 3 exposures at weight 0"));
        periods.add(tested(4, 0.0009));
        List<Period> judged = TEST.acrossPeriods(periods);
        assertNull(judged.get(0));
        assertEquals(Outcome.SKIPPED, judged.get(1).outcome());
        assertEquals(Outcome.FLAGGED, judged.get(2).outcome());
        // One tested period: Holm's level is alpha itself, so this is the plain test.
        assertEquals(Outcome.FLAGGED, judged.get(3).outcome());
        assertEquals(0.001, judged.get(3).level(), 0.0);
    }

    /** A period judged alone at alpha 0.001 with p-value {@code p} (flagged when p < 0.001). */
    private static Period tested(long from, double p) {
        boolean flagged = p < 0.001;
        return new Period(from, from + 1, new long[] {50, 50}, new double[] {0.5, 0.5}, null, 1, null,
                new double[] {0.5, 0.5}, null, 1.0, 0.0, p, 0.001, flagged ? Outcome.FLAGGED : Outcome.PASSED,
                flagged ? "exposures do not follow the weights" : null);
    }
}
