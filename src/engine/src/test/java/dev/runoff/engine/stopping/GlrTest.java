package dev.runoff.engine.stopping;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.runoff.engine.core.Arm;
import dev.runoff.engine.core.Metric;
import dev.runoff.engine.stats.BernoulliStats;
import dev.runoff.engine.stats.ValueStats;
import java.util.List;
import org.junit.jupiter.api.Test;

class GlrTest {

    private static double kl(double p, double q) {
        return p * Math.log(p / q) + (1 - p) * Math.log((1 - p) / (1 - q));
    }

    private static Arm bernoulli(String name, long trials, long successes) {
        return new Arm(name, new BernoulliStats(trials, successes));
    }

    @Test
    void bernoulliStatisticMatchesAHandComputation() {
        // Garivier & Kaufmann (2016), section 3: Z_{a,b} = N_a d(mu_a, mu_ab) + N_b d(mu_b, mu_ab).
        // A = 60/100, B = 40/100: mu_ab = 0.5 and Z = 200 (0.6 ln 1.2 + 0.4 ln 0.8) = 4.0271027... by hand.
        // C = 44/80: mu_ac = 104/180; Z_{A,C} = 100 kl(0.6, 104/180) + 80 kl(0.55, 104/180), the minimum.
        Glr.Statistic z = Glr.statistic(List.of(bernoulli("B", 100, 40), bernoulli("A", 100, 60),
                bernoulli("C", 80, 44)));
        double zab = 200 * (0.6 * Math.log(1.2) + 0.4 * Math.log(0.8));
        assertEquals(4.027102710, zab, 1e-9);
        double m = 104.0 / 180;
        double zac = 100 * kl(0.6, m) + 80 * kl(0.55, m);
        assertTrue(zac < zab);
        assertEquals(1, z.leader());
        assertEquals(2, z.challenger());
        assertEquals(zac, z.value(), 1e-12);
        assertEquals(280, z.trials());
    }

    @Test
    void bernoulliStatisticHandlesRatesOfZeroAndOne() {
        // 0 log 0 = 0 convention; A = 10/10, B = 0/10, mu_ab = 1/2: Z = 10 log 2 + 10 log 2 (by hand).
        Glr.Statistic z = Glr.statistic(List.of(bernoulli("A", 10, 10), bernoulli("B", 10, 0)));
        assertEquals(20 * Math.log(2), z.value(), 1e-12);
    }

    @Test
    void gaussianStatisticUsesTheSampleVariances() {
        // Gaussian GLR with known variances: Z = (mu_a - mu_b)^2 / (2 (s_a^2 / N_a + s_b^2 / N_b)), here with
        // the sample standard deviations 2.0 and 3.0 plugged in: 0.5^2 / (2 (4/100 + 9/150)) = 1.25.
        Glr.Statistic z = Glr.statistic(List.of(new Arm("A", ValueStats.ofSummary(100, 10.5, 2.0)),
                new Arm("B", ValueStats.ofSummary(150, 10.0, 3.0))));
        assertEquals(0.25 / (2 * (4.0 / 100 + 9.0 / 150)), z.value(), 1e-12);
        assertEquals(1.25, z.value(), 1e-9);
        assertEquals(0, z.leader());
    }

    @Test
    void statisticIsZeroWhileSomeArmHasNoData() {
        assertEquals(0.0, Glr.statistic(List.of(bernoulli("A", 100, 90), bernoulli("B", 0, 0))).value());
        assertEquals(0.0, Glr.statistic(List.of(new Arm("A", ValueStats.ofSummary(100, 5, 1)),
                new Arm("B", ValueStats.EMPTY.add(1.0)))).value());
        assertEquals(0.0, Glr.statistic(List.of(new Arm("A", ValueStats.ofSummary(10, 5, 0)),
                new Arm("B", ValueStats.ofSummary(10, 4, 0)))).value());
    }

    @Test
    void rejectsMixedStatisticsAndSingleArms() {
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class, () -> Glr.statistic(List.of(
                bernoulli("A", 10, 5), new Arm("B", ValueStats.ofSummary(10, 1, 1)))));
        assertEquals("arm 'B' has VALUE statistics but arm 'A' has BERNOULLI", e.getMessage());
        assertEquals("need at least 2 arms, got 1", assertThrows(IllegalArgumentException.class,
                () -> Glr.statistic(List.of(bernoulli("A", 10, 5)))).getMessage());
    }

    @Test
    void aPairWhoseStatisticIsUndefinedCarriesNoEvidence() {
        List<Arm> arms = List.of(bernoulli("A", 100, 60), bernoulli("B", 100, 10), bernoulli("C", 100, 20));
        Glr.Statistic z = Glr.minOverChallengers(arms, Metric.BERNOULLI, 0,
                (a, b) -> b.trials() == 100 && ((BernoulliStats) b).successes() == 20 ? Double.NaN : 50.0);
        assertEquals(0.0, z.value());
        assertEquals(2, z.challenger());

        Glr.Statistic allUndefined = Glr.minOverChallengers(arms, Metric.BERNOULLI, 0, (a, b) -> Double.NaN);
        assertEquals(0.0, allUndefined.value());
    }
}
