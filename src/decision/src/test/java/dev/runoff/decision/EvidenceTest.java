package dev.runoff.decision;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.runoff.engine.planning.ArmModel;
import dev.runoff.engine.planning.PosteriorRates;
import java.util.ArrayList;
import java.util.List;
import java.util.Map;
import org.junit.jupiter.api.Test;

class EvidenceTest {

    private static final List<String> ARMS = List.of("a", "b", "c");

    private static Evidence.Snapshot snapshot(long trials, int draws, double[] alpha, double[] se, double[] exact) {
        return new Evidence.Snapshot(ARMS, new long[] {trials, trials, trials}, alpha, se, draws, exact);
    }

    @Test
    void leaderHasNoPointAndOthersReadAsMinusLogProbability() {
        Evidence.Row row = Evidence.of(List.of(snapshot(100, 0, new double[] {0.9, 0.09, 0.01},
                new double[3], null))).get(0);
        assertEquals("a", row.leader());
        assertEquals(List.of("b", "c"), List.copyOf(row.points().keySet()));
        assertEquals(-Math.log(0.09), row.points().get("b").evidence(), 1e-15);
        assertEquals(Evidence.Source.EXACT, row.points().get("b").source());
        assertTrue(Double.isNaN(row.points().get("b").ratePerThousand()), "one decision has no slope");
    }

    @Test
    void anArmAGuardrailSuspendedHasNoPointLikeTheLeader() {
        // its alpha is 0 because the job left it out of the estimate, not because the data rule it out
        Evidence.Row row = Evidence.of(List.of(new Evidence.Snapshot(ARMS, new long[] {100, 100, 100},
                new double[] {0.9, 0, 0.1}, new double[3], 0, null, new boolean[] {false, true, false}))).get(0);
        assertEquals(List.of("c"), List.copyOf(row.points().keySet()));
        assertEquals(-Math.log(0.1), row.points().get("c").evidence(), 1e-15);
    }

    @Test
    void monteCarloZeroIsTheClopperPearsonBoundNeverInfinite() {
        // one-sided 95% Clopper-Pearson bound at 0 wins in 10,000 draws: 1 - 0.05^(1/10000) = 2.9953e-4
        // (Clopper and Pearson 1934); its -ln is 8.1133.
        Evidence.Point p = Evidence.value(snapshot(100, 10_000, new double[] {0.97, 0.03, 0},
                new double[] {0.002, 0.0017, 0}, null), 2);
        assertTrue(p.isBound());
        assertEquals(-Math.log(1 - Math.pow(0.05, 1.0 / 10_000)), p.evidence(), 1e-12);
        assertEquals(8.1133, p.evidence(), 1e-4);
    }

    @Test
    void eachRecordedNumberKeepsItsMeaning() {
        Evidence.Snapshot mc = snapshot(100, 10_000, new double[] {0.97, 0.03, 1e-9}, new double[] {0.002, 0.0017, 0},
                null);
        assertEquals(Evidence.Source.COUNT, Evidence.value(mc, 1).source());
        assertEquals(Evidence.Source.CONDITIONAL, Evidence.value(mc, 2).source());
        assertEquals(-Math.log(1e-9), Evidence.value(mc, 2).evidence(), 1e-12);
        Evidence.Snapshot recomputed = snapshot(100, 10_000, new double[] {0.97, 0.03, 0},
                new double[] {0.002, 0.0017, 0}, new double[] {0.969, 0.031, 1e-40});
        assertEquals(Evidence.Source.RECOMPUTED, Evidence.value(recomputed, 2).source());
        assertEquals(40 * Math.log(10), Evidence.value(recomputed, 2).evidence(), 1e-9);
        Evidence.Snapshot underflow = snapshot(100, 0, new double[] {1, 0, 0}, new double[3], null);
        assertTrue(Evidence.value(underflow, 1).isBound());
        // -ln of the smallest positive double, 4.9e-324 (IEEE 754 binary64)
        assertEquals(-Math.log(Double.MIN_VALUE), Evidence.value(underflow, 1).evidence(), 1e-9);
    }

    @Test
    void rateIsTheLeastSquaresSlopeOverTheTrailingHalfOfTheTrials() {
        // evidence against b grows 0.1 per 1,000 trials up to 45,000 trials, then 0.9; against c 1.6 throughout.
        // At 120,000 trials the window (60,000 trials on) holds only the second stretch, and a noise-free line
        // gives its slope exactly; at 75,000 trials the window reaches back into the first stretch.
        List<Evidence.Snapshot> snapshots = new ArrayList<>();
        for (int d = 1; d <= 40; d++) {
            long total = 3_000L * d;
            double eb = d <= 15 ? 0.1 * total / 1000 : 4.5 + 0.9 * (total - 45_000) / 1000;
            double ec = 1.6 * total / 1000;
            double pb = Math.exp(-eb);
            double pc = Math.exp(-ec);
            snapshots.add(snapshot(1_000L * d, 0, new double[] {1 - pb - pc, pb, pc}, new double[3], null));
        }
        List<Evidence.Row> rows = Evidence.of(snapshots);
        Evidence.Row last = rows.get(39);
        assertEquals(0.9, last.points().get("b").ratePerThousand(), 1e-9);
        assertEquals(1.6, last.points().get("c").ratePerThousand(), 1e-9);
        assertTrue(rows.get(24).points().get("b").ratePerThousand() < 0.85, rows.get(24).toString());
        Evidence.Balance balance = Evidence.balance(last);
        assertEquals(Evidence.Verdict.BALANCED, balance.verdict());
        assertEquals("b", balance.slowest());
        assertEquals(1.6 / 0.9, balance.ratio(), 1e-9);
    }

    @Test
    void ratiosAboveTheToleranceOrFlatEvidenceAreUnbalanced() {
        Evidence.Row row = new Evidence.Row(1000, "a", Map.of(
                "b", new Evidence.Point(5, Evidence.Source.EXACT, 0.5),
                "c", new Evidence.Point(9, Evidence.Source.EXACT, 1.01)));
        assertEquals(Evidence.Verdict.UNBALANCED, Evidence.balance(row).verdict());
        Evidence.Row flat = new Evidence.Row(1000, "a", Map.of(
                "b", new Evidence.Point(5, Evidence.Source.EXACT, -0.01),
                "c", new Evidence.Point(9, Evidence.Source.EXACT, 0.3)));
        Evidence.Balance balance = Evidence.balance(flat);
        assertEquals(Evidence.Verdict.UNBALANCED, balance.verdict());
        assertEquals("b", balance.slowest());
        assertEquals(Double.POSITIVE_INFINITY, balance.ratio());
        Evidence.Row one = new Evidence.Row(1000, "a", Map.of(
                "b", new Evidence.Point(5, Evidence.Source.EXACT, 0.5),
                "c", new Evidence.Point(9, Evidence.Source.BOUND, Double.NaN)));
        assertEquals(Evidence.Verdict.UNDETERMINED, Evidence.balance(one).verdict());
    }

    @Test
    void referenceRatesComeFromThePlannerPerThousandTrials() {
        double[] means = {0.05, 0.04, 0.02};
        Evidence.Reference ref = Evidence.reference(means, 0.5);
        assertEquals(1000 * PosteriorRates.betaOptimal(ArmModel.bernoulli(means), 0.5), ref.betaOptimal(), 1e-12);
        assertEquals(1000 * PosteriorRates.uniform(ArmModel.bernoulli(means)), ref.uniform(), 1e-12);
        assertTrue(Double.isNaN(Evidence.reference(means, 0).betaOptimal()));
        assertNull(Evidence.reference(new double[] {0.05, 0.05}, 0.5));
        assertNull(Evidence.reference(new double[] {0, 0.05}, 0.5));
    }

    @Test
    void snapshotArraysMustMatchTheArms() {
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class,
                () -> new Evidence.Snapshot(ARMS, new long[2], new double[3], new double[3], 0, null));
        assertTrue(e.getMessage().contains("one entry per arm (3)"), e.getMessage());
        assertFalse(Evidence.value(snapshot(1, 0, new double[] {0.5, 0.3, 0.2}, new double[3], null), 1).isBound());
    }
}
