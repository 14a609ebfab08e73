package dev.runoff.engine.stopping;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.runoff.engine.core.Arm;
import dev.runoff.engine.planning.SimulationSummary;
import dev.runoff.engine.stats.BernoulliStats;
import dev.runoff.engine.stats.ValueStats;
import java.util.List;
import java.util.SplittableRandom;
import org.junit.jupiter.api.Test;

class SequentialTTest {
    // Twelve invented observations per arm (n = 12); c^2 = 1.
    private static final double[] X = {12.4, 9.8, 11.1, 13.0, 10.6, 12.2, 9.1, 11.7, 10.9, 12.8, 11.5, 10.2};
    private static final double[] Y = {9.9, 10.4, 8.7, 10.1, 9.5, 11.0, 9.2, 10.6, 8.9, 9.8, 10.3, 9.4};

    private static ValueStats of(double[] values) {
        ValueStats s = ValueStats.EMPTY;
        for (double v : values) {
            s = s.add(v);
        }
        return s;
    }

    @Test
    void theMartingaleMatchesTheStatedFormulaFromRawSums() {
        // Reference: G_n(m) = sqrt(c^2/(n+c^2)) ((n+c^2) V / ((n+c^2) V - S^2))^(n/2) with S = sum(x - m),
        // V = sum (x - m)^2, evaluated from the raw observations in mpmath 1.3.0 (40 digits): the Gaussian
        // mixture of scale-invariant likelihood ratios of Wang & Ramdas (2024), arXiv 2310.03722
        // (derived again in src/docs/planning-and-stopping.md; it matches the formula a public implementation
        // attributes to the paper's Theorem 4.9, whose text could not be read here).
        assertEquals(2.903893210262789, SequentialT.logMartingale(of(X), 10.0), 1e-12);
        assertEquals(0.0, SequentialT.logMartingale(new ValueStats(1, 4.2, 0.0), 7.0), 1e-15,
                "one observation carries no scale-free evidence: G_1 = 1");
    }

    @Test
    void theRadiusIsWhereTheMartingaleReachesOneOverAlpha() {
        // Reference: the root of log G_n(m) = log(1/alpha) above the mean, found by mpmath findroot on the
        // raw-sum formula (script in the test comment above): radius 1.296257208726911 at alpha 0.05 and
        // 2.938346394868308 at alpha 0.00025.
        ValueStats x = of(X);
        assertEquals(1.296257208726911, SequentialT.radius(x, 0.05), 1e-9);
        assertEquals(2.938346394868308, SequentialT.radius(x, 0.00025), 1e-9);
        assertEquals(StrictMath.log(1 / 0.05), SequentialT.logMartingale(x, x.mean() + SequentialT.radius(x, 0.05)),
                1e-9);
    }

    @Test
    void theSequenceIsTheWholeLineWhileTheBoundOfTheMartingaleIsBelowOneOverAlpha() {
        // sup_m G_n = ((n + c^2)/c^2)^((n - 1)/2): 2^(1/2) at n = 2, far below 4000 = 1/(0.001/4)
        assertEquals(Double.POSITIVE_INFINITY, SequentialT.radius(new ValueStats(2, 0.0, 1.0), 0.00025));
        assertTrue(Double.isFinite(SequentialT.radius(new ValueStats(10, 0.0, 9.0), 0.00025)));
    }

    @Test
    void theSeparationIsTheMartingaleWhereTheTwoArmsCross() {
        // Reference: mpmath findroot of log G_X(m) = log G_Y(m) gives m = 10.349493650882368 and
        // log G there 1.361683568634219.
        List<Arm> arms = List.of(new Arm("x", of(X)), new Arm("y", of(Y)));
        Glr.Statistic s = SequentialT.statistic(arms);
        assertEquals(0, s.leader());
        assertEquals(1, s.challenger());
        assertEquals(1.361683568634219, s.value(), 1e-9);
        assertEquals(24, s.trials());
    }

    @Test
    void theRuleFiresExactlyWhenTheTwoIntervalsAreDisjoint() {
        SplittableRandom rng = new SplittableRandom(3);
        int checked = 0;
        for (int i = 0; i < 400; i++) {
            ValueStats a = ValueStats.EMPTY;
            ValueStats b = ValueStats.EMPTY;
            int n = 5 + rng.nextInt(200);
            for (int j = 0; j < n; j++) {
                a = a.add(1.0 + 0.6 * rng.nextGaussian());
                b = b.add(0.6 + 0.6 * rng.nextGaussian());
            }
            if (a.mean() < b.mean()) {
                continue;
            }
            double alpha = 0.01 / 2;
            boolean disjoint = a.mean() - SequentialT.radius(a, alpha) > b.mean() + SequentialT.radius(b, alpha);
            double separation = SequentialT.separation(a, b);
            if (Math.abs(separation - StrictMath.log(1 / alpha)) > 1e-9) {
                assertEquals(disjoint, separation >= StrictMath.log(1 / alpha), "n = " + n);
                checked++;
            }
        }
        assertTrue(checked > 300, "checked " + checked);
    }

    @Test
    void eachArmsSequenceCoversItsMeanAtEveryCountWithProbabilityAtLeastOneMinusAlpha() {
        // Ville's inequality: P(exists n: mean outside C_n) <= alpha. 2,000 seeded runs of N(3, 2^2), checked at
        // every n up to 300, alpha 0.05 (58 missed when written): the two-sided 99% Clopper-Pearson interval of the miss rate must reach
        // down to alpha or below (it would not if the sequence were too narrow).
        SplittableRandom rng = new SplittableRandom(11);
        int runs = 2_000;
        int misses = 0;
        double widthAt300 = 0;
        for (int run = 0; run < runs; run++) {
            ValueStats s = ValueStats.EMPTY;
            boolean missed = false;
            for (int n = 1; n <= 300; n++) {
                s = s.add(3.0 + 2.0 * rng.nextGaussian());
                if (!missed && Math.abs(s.mean() - 3.0) >= SequentialT.radius(s, 0.05)) {
                    missed = true;
                }
            }
            misses += missed ? 1 : 0;
            widthAt300 += SequentialT.radius(s, 0.05) / runs;
        }
        SimulationSummary.Interval ci = SimulationSummary.Interval.clopperPearson(misses, runs, 0.99);
        assertTrue(ci.lower() <= 0.05, misses + " misses of " + runs);
        // not the whole line: for large n the closed form gives r^2 about sigma^2 (2 log(1/alpha) + log n) / n,
        // 2 sqrt((2 log 20 + log 300) / 300) = 0.39 here
        assertTrue(widthAt300 < 0.45 && widthAt300 > 0.35, "mean radius at n = 300: " + widthAt300);
    }

    @Test
    void farApartMeansGiveAFiniteStatisticWhereTheirSquareWouldOverflow() {
        // d = 1e160: d^2 overflows a double; the bound of G_n is ((n + c^2)/c^2)^((n - 1)/2), so for n = 30
        // log G_n at such a distance is 14.5 log 31 (the limit of the closed form as d grows)
        List<Arm> arms = List.of(new Arm("a", new ValueStats(30, 1e160, 1.0)), new Arm("b", new ValueStats(30, 0, 1.0)));
        Glr.Statistic s = SequentialT.statistic(arms);
        assertEquals(14.5 * Math.log(31), s.value(), 1e-9);
    }

    @Test
    void rateArmsAreRefusedWithAMessageNamingTheRule() {
        List<Arm> rates = List.of(new Arm("a", new BernoulliStats(10, 3)), new Arm("b", new BernoulliStats(10, 5)));
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class,
                () -> SequentialT.statistic(rates));
        assertTrue(e.getMessage().contains("sequential-t"), e.getMessage());
    }

    @Test
    void theThresholdSplitsDeltaOverEveryArm() {
        assertEquals(StrictMath.log(4 / 0.001), SequentialT.threshold(4, 0.001), 0.0);
        assertThrows(IllegalArgumentException.class, () -> SequentialT.threshold(1, 0.001));
    }
}
