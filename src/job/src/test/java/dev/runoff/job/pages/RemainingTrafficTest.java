package dev.runoff.job.pages;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.runoff.engine.stats.ArmStats;
import dev.runoff.engine.stats.BernoulliStats;
import dev.runoff.engine.stats.ValueStats;
import dev.runoff.records.avro.DecisionRecord;
import dev.runoff.testkit.TestDefinitions;
import java.util.List;
import org.junit.jupiter.api.Test;

class RemainingTrafficTest {

    @Test
    void twoGaussianArmsWithEqualVariancesNeedEightSigmaSquaredOverGapSquaredTimesTheThreshold() {
        // Two Gaussian arms of common variance sigma^2 sampled half and half: T = 8 sigma^2 / gap^2 (Kaufmann,
        // Cappe and Garivier 2016, JMLR 17, the two-armed Gaussian case); the GLR statistic grows like t / T and
        // stops at its threshold (Garivier and Kaufmann 2016, section 3), so T x threshold trials in all.
        // Means 1.0 and 1.5 over 10 values each, sample variance m2 / (n - 1) = 9 / 9 = 1: T = 8 / 0.25 = 32.
        List<DecisionRecord> chain = DecisionChains.run(TestDefinitions.value("basket", "a", "b"), 1,
                d -> new ArmStats[] {new ValueStats(10, 1.0, 9.0), new ValueStats(10, 1.5, 9.0)});
        DecisionRecord r = chain.get(0);
        assertEquals(0.05, r.getDelta());
        assertEquals(0.5, r.getAllocationBeta());
        RemainingTraffic t = RemainingTraffic.of(r);
        assertTrue(r.getThreshold() > Math.log(1 / 0.05), "the GLR threshold exceeds log(1/delta)");
        long expected = Math.round(32 * r.getThreshold());
        assertEquals(expected, t.predictedTotal(), t.note());
        assertEquals(expected - 20, t.remaining());
    }

    @Test
    void aStoppedExperimentNeedsNoMoreTrafficAndTiedArmsGetNoPrediction() {
        List<DecisionRecord> stopped = DecisionChains.run(TestDefinitions.bernoulli("s", "a", "b"), 3,
                d -> new ArmStats[] {new BernoulliStats(500, 5), new BernoulliStats(500, 100)});
        assertEquals(0, RemainingTraffic.of(stopped.get(stopped.size() - 1)).remaining());
        List<DecisionRecord> tied = DecisionChains.run(TestDefinitions.bernoulli("t", "a", "b"), 1,
                d -> new ArmStats[] {new BernoulliStats(100, 10), new BernoulliStats(100, 10)});
        RemainingTraffic none = RemainingTraffic.of(tied.get(0));
        assertEquals(-1, none.remaining());
        assertTrue(none.note().contains("share the best estimate"), none.note());
    }
}
