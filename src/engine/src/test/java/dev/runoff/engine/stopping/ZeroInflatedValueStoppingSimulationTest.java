package dev.runoff.engine.stopping;

import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.runoff.engine.best.ProbabilityBest;
import dev.runoff.engine.core.Arm;
import dev.runoff.engine.stats.ValueStats;
import java.time.Instant;
import java.util.List;
import java.util.SplittableRandom;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.EnumSource;

/**
 * Value per unit: how often SEQUENTIAL_T and GLR name a wrong arm when each unit's value is zero-inflated and
 * heavy-tailed (most units spend nothing, the rest a lognormal amount), capped as a VALUE_PER_UNIT metric caps
 * it. Both rules' guarantees assume Gaussian observations and these are not, so this measures, it does not
 * prove. Two arms, one unit each per step, checked every 10 units per arm up to 200, then every 200, from 10
 * units per arm (the least protective minimum), delta 0.05, seeded. The scenario values are invented.
 *
 * <p>Measured (seeds as below, 300 runs each): tied arms, 5% and 1% buyers: no run stopped for either rule
 * (every stop would be an error); 5% against 8% buyers: SEQUENTIAL_T stopped in 295 runs and GLR in 294,
 * none naming the worse arm. The same runs with the cap raised to 1e9 (in effect none) and sigma 2.5 (5% against
 * 8% buyers) stopped in none of 300 runs within 20,000 units per arm for either rule, and tied arms with 1%
 * buyers and sigma 3.0 never stopped: no errors, but no power either (measured once by editing the
 * constants, not kept as a test). What holds: on these capped, bounded values both rules erred far less often
 * than delta allows. What does not follow: a guarantee for other distributions; a cap far above what the sums
 * reach brings back the heavy tail, and the runs above lost their power to it.
 */
class ZeroInflatedValueStoppingSimulationTest {
    private static final double DELTA = 0.05;
    private static final double CAP = 400;
    private static final int RUNS = 300;
    private static final Instant T0 = Instant.parse("2026-01-01T00:00:00Z");
    private static final ProbabilityBest EVEN = new ProbabilityBest(new double[] {0.5, 0.5}, new double[2],
            ProbabilityBest.Method.EXACT, 0);

    /** Per-unit values: a share of buyers whose spend is lognormal(log 40, sigma), each unit's sum capped. */
    private record Spend(double buyers, double sigma) {
        double unit(SplittableRandom rng) {
            if (rng.nextDouble() >= buyers) {
                return 0;
            }
            return Math.min(CAP, StrictMath.exp(StrictMath.log(40) + sigma * rng.nextGaussian()));
        }
    }

    /** What the runs did: how many stopped, how many of those named arm 0 (never better than arm 1). */
    private record Outcome(int stops, int wrong) {
    }

    private static Outcome run(Rule rule, Spend a, Spend b, int maxPerArm, long seed) {
        StoppingConfig config = StoppingConfig.glr(DELTA).withRule(rule).withMinTrialsPerArm(10);
        SplittableRandom rng = new SplittableRandom(seed);
        int stops = 0;
        int wrong = 0;
        for (int run = 0; run < RUNS; run++) {
            ValueStats sa = ValueStats.EMPTY;
            ValueStats sb = ValueStats.EMPTY;
            for (int n = 1; n <= maxPerArm; n++) {
                sa = sa.add(a.unit(rng));
                sb = sb.add(b.unit(rng));
                if (n % (n < 200 ? 10 : 200) != 0) {
                    continue;
                }
                Verdict v = StoppingCheck.decide(List.of(new Arm("a", sa), new Arm("b", sb)), EVEN,
                        new Timing(T0, T0), config);
                if (v.isStop()) {
                    stops++;
                    wrong += v.leader() == 0 || a.equals(b) ? 1 : 0;
                    break;
                }
            }
        }
        return new Outcome(stops, wrong);
    }

    @ParameterizedTest
    @EnumSource(value = Rule.class, names = {"SEQUENTIAL_T", "GLR"})
    void tiedZeroInflatedArmsStopWithinDelta(Rule rule) {
        // Tied arms: every stop names an arm that is not better. delta * RUNS = 15 stops allowed.
        for (Spend spend : List.of(new Spend(0.05, 1.2), new Spend(0.01, 2.0))) {
            Outcome tied = run(rule, spend, spend, 5_000, 11);
            assertTrue(tied.wrong() <= DELTA * RUNS, rule + " " + spend + ": " + tied);
        }
    }

    @ParameterizedTest
    @EnumSource(value = Rule.class, names = {"SEQUENTIAL_T", "GLR"})
    void separatedZeroInflatedArmsStopOnTheBetterArmWithinDelta(Rule rule) {
        Outcome apart = run(rule, new Spend(0.05, 1.2), new Spend(0.08, 1.2), 20_000, 12);
        assertTrue(apart.stops() >= 0.9 * RUNS, "the rule must stop in most runs to be measured: " + apart);
        assertTrue(apart.wrong() <= DELTA * apart.stops(), rule + ": " + apart);
    }
}
