package dev.runoff.audit;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.runoff.records.HashChain;
import dev.runoff.records.avro.DecisionRecord;
import dev.runoff.records.avro.ExperimentDefinition;
import java.util.ArrayList;
import java.util.List;
import java.util.function.Function;
import org.apache.commons.rng.UniformRandomProvider;
import org.apache.commons.rng.simple.RandomSource;
import org.junit.jupiter.api.Test;

/**
 * The sample-ratio check against serving tiers simulated unit by unit: an honest tier uses any weight vector
 * still valid at the moment it serves (up to a whole validity window late) and falls back to uniform once the
 * latest has expired; the others break the contract.
 */
class ContractSampleRatioTest {

    private static final List<String> ARMS = List.of("a", "b", "c");
    private static final double ALPHA = 0.001;
    private static final int PERIODS = 200;
    private static final int UNITS = 3_000;
    private static final long GAP_MS = 20 * 60_000L;

    @Test
    void honestTierThatUsesAnyValidVectorPassesEveryPeriod() {
        // The test is conservative (level <= alpha per period, see SampleRatio), so over 200 periods at alpha
        // 0.001 the expected number of false flags is at most 200 * 0.001 = 0.2; the run is seeded.
        List<DecisionRecord> chain = simulate(11, PERIODS, true, ContractSampleRatioTest::skewed, Tier.HONEST);
        ExperimentAudit audit = new Verifier(ALPHA).verifyExperiment("srm", Chains.entries(chain));
        assertEquals(0, audit.count(SampleRatio.Outcome.FLAGGED), flagged(audit));
        assertEquals(PERIODS, audit.count(SampleRatio.Outcome.PASSED), audit.periods().toString());
        // The run exercises both allowances: many valid vectors per period, and the uniform fallback.
        assertTrue(audit.periods().stream().anyMatch(p -> p.candidates() > 10), audit.periods().toString());
        assertTrue(audit.periods().stream().anyMatch(p -> p.mixture().stream().anyMatch(c -> c.sequence() == null)),
                audit.periods().toString());
    }

    @Test
    void honestTierFailsTheOldTwoVectorCheck() {
        // The same honest serving judged against the record's own weights only (the plain test) is flagged in
        // most periods: what the contract allows is what makes it pass.
        List<DecisionRecord> chain = simulate(11, 40, false, ContractSampleRatioTest::skewed, Tier.HONEST);
        SampleRatio test = new SampleRatio(ALPHA);
        long flagged = 0;
        for (int i = 1; i < chain.size(); i++) {
            flagged += test.test(chain.get(i - 1), chain.get(i)).outcome() == SampleRatio.Outcome.FLAGGED ? 1 : 0;
        }
        assertTrue(flagged > 20, flagged + " of 40 flagged");
    }

    @Test
    void tierThatIgnoresTheWeightsIsFlaggedInEveryPeriod() {
        // Every published vector gives arm a at least 0.7, so uniform serving (a = 1/3) is outside their hull.
        List<DecisionRecord> chain = simulate(12, 50, false, ContractSampleRatioTest::skewed, Tier.UNIFORM);
        ExperimentAudit audit = new Verifier(ALPHA).verifyExperiment("srm", Chains.entries(chain));
        assertEquals(50, audit.count(SampleRatio.Outcome.FLAGGED), audit.periods().toString());
    }

    @Test
    void tierThatServesAnArmWithWeightZeroInEveryValidVectorIsFlagged() {
        List<DecisionRecord> chain = simulate(13, 20, false, ContractSampleRatioTest::withoutC, Tier.LEAKS_C);
        ExperimentAudit audit = new Verifier(ALPHA).verifyExperiment("srm", Chains.entries(chain));
        assertEquals(20, audit.count(SampleRatio.Outcome.FLAGGED), audit.periods().toString());
        SampleRatio.Period last = audit.periods().get(audit.periods().size() - 1);
        assertTrue(last.note().contains("exposures at weight 0 (in every one of the 16 weight vectors valid"),
                last.note());
    }

    /** How a simulated tier draws a unit's arm from the vector it would use. */
    private enum Tier {
        HONEST, UNIFORM, LEAKS_C
    }

    /** Random weights with arm a in [0.7, 0.9] and the rest split at random (each at least 0.02). */
    private static double[] skewed(UniformRandomProvider rng) {
        double a = 0.7 + 0.2 * rng.nextDouble();
        double u = 0.2 + 0.6 * rng.nextDouble();
        return new double[] {a, (1 - a) * u, (1 - a) * (1 - u)};
    }

    /** Random weights over a and b only. */
    private static double[] withoutC(UniformRandomProvider rng) {
        double a = 0.3 + 0.4 * rng.nextDouble();
        return new double[] {a, 1 - a, 0.0};
    }

    /**
     * A chain of {@code periods + 1} records (so {@code periods} periods) one minute apart (every 50th period lasts {@link #GAP_MS}, longer
     * than the validity window, when {@code gaps}); in each period {@link #UNITS} units arrive at uniform times
     * and each is served, by an honest tier, from a vector drawn uniformly among those published and still valid
     * at its arrival, or uniformly over the arms when none is.
     */
    private static List<DecisionRecord> simulate(long seed, int periods, boolean gaps,
                                                 Function<UniformRandomProvider, double[]> weights, Tier tier) {
        UniformRandomProvider rng = RandomSource.SPLIT_MIX_64.create(seed);
        ExperimentDefinition def = Chains.definition("srm", ARMS);
        long validFor = def.getValidForMs();
        long[] trials = new long[ARMS.size()];
        long[] successes = new long[ARMS.size()];
        List<DecisionRecord> records = new ArrayList<>();
        List<double[]> published = new ArrayList<>();
        List<Long> times = new ArrayList<>();
        long time = Chains.T0;
        for (int k = 0; k <= periods; k++) {
            if (k > 0) {
                long start = time;
                time += gaps && k % 50 == 0 ? GAP_MS : Chains.PERIOD_MS;
                for (int u = 0; u < UNITS; u++) {
                    long at = start + 1 + (long) (rng.nextDouble() * (time - start - 1));
                    List<double[]> valid = new ArrayList<>();
                    for (int j = 0; j < published.size(); j++) {
                        if (times.get(j) + validFor >= at) {
                            valid.add(published.get(j));
                        }
                    }
                    double[] in = valid.isEmpty() ? new double[] {1.0 / 3, 1.0 / 3, 1.0 / 3}
                            : valid.get(rng.nextInt(valid.size()));
                    int arm = draw(rng, tier == Tier.UNIFORM ? new double[] {1.0 / 3, 1.0 / 3, 1.0 / 3} : in);
                    if (tier == Tier.LEAKS_C && rng.nextDouble() < 0.01) {
                        arm = 2;
                    }
                    trials[arm]++;
                }
            }
            double[] w = weights.apply(rng);
            published.add(w);
            times.add(time);
            records.add(Chains.record(def, k + 1, time, trials, successes, w, false));
        }
        return HashChain.chain(records);
    }

    private static int draw(UniformRandomProvider rng, double[] shares) {
        double x = rng.nextDouble();
        for (int i = 0; i < shares.length - 1; i++) {
            x -= shares[i];
            if (x < 0) {
                return i;
            }
        }
        return shares.length - 1;
    }

    private static String flagged(ExperimentAudit audit) {
        return audit.periods().stream().filter(p -> p.outcome() == SampleRatio.Outcome.FLAGGED).toList().toString();
    }
}
