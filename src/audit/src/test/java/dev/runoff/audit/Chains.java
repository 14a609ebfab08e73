package dev.runoff.audit;

import dev.runoff.records.HashChain;
import dev.runoff.records.avro.AllocationRule;
import dev.runoff.records.avro.ArmState;
import dev.runoff.records.avro.BetaParams;
import dev.runoff.records.avro.Decision;
import dev.runoff.records.avro.DecisionRecord;
import dev.runoff.records.avro.EstimationMethod;
import dev.runoff.records.avro.ExperimentDefinition;
import dev.runoff.records.avro.StoppingRule;
import java.util.ArrayList;
import java.util.List;
import org.apache.commons.rng.UniformRandomProvider;
import org.apache.commons.rng.sampling.DiscreteProbabilityCollectionSampler;
import org.apache.commons.rng.simple.RandomSource;

/**
 * Sealed chains of Bernoulli decision records built by hand: valid for the codec and the hash chain, with
 * exposure counts drawn from chosen weights. Their probabilities are placeholders, so they are for the checks
 * that do not recompute (chain, sequence, sample ratio, reports).
 */
final class Chains {

    /** 2023-11-14T22:13:20Z. */
    static final long T0 = 1_700_000_000_000L;
    static final long PERIOD_MS = 60_000;

    private Chains() {
    }

    /** The definition of {@link SimulatedJob#definition} without a minimum duration. */
    static ExperimentDefinition definition(String id, List<String> arms) {
        return SimulatedJob.definition(id, arms, 0);
    }

    /**
     * A chain of {@code weights.length} records: before record k (k >= 2) the arms receive
     * {@code exposures} trials drawn i.i.d. from {@code served[k - 1]} (a success with probability 0.1 each),
     * while record k - 1 published {@code weights[k - 1]}. The last record is a STOP for the first arm when
     * {@code stopAtEnd}.
     */
    static List<DecisionRecord> chain(String id, List<String> arms, double[][] weights, double[][] served,
                                      int exposures, long seed, boolean stopAtEnd) {
        return lagged(id, arms, weights, served, 0.0, exposures, seed, stopAtEnd);
    }

    /**
     * As {@link #chain}, but before record k (k >= 3) a share {@code lag} of the {@code exposures} trials (rounded)
     * is drawn from {@code served[k - 2]}, the period before: a pipeline that folds exposures one period late.
     */
    static List<DecisionRecord> lagged(String id, List<String> arms, double[][] weights, double[][] served,
                                       double lag, int exposures, long seed, boolean stopAtEnd) {
        int late = (int) Math.round(lag * exposures);
        UniformRandomProvider rng = RandomSource.SPLIT_MIX_64.create(seed);
        ExperimentDefinition def = definition(id, arms);
        long[] trials = new long[arms.size()];
        long[] successes = new long[arms.size()];
        List<DecisionRecord> records = new ArrayList<>();
        for (int k = 0; k < weights.length; k++) {
            if (k > 1) {
                draw(rng, served[k - 2], late, trials, successes);
                draw(rng, served[k - 1], exposures - late, trials, successes);
            } else if (k > 0) {
                draw(rng, served[k - 1], exposures, trials, successes);
            }
            boolean stop = stopAtEnd && k == weights.length - 1;
            records.add(record(def, k + 1, T0 + k * PERIOD_MS, trials, successes, weights[k], stop));
        }
        return HashChain.chain(records);
    }

    /** {@code n} copies of {@code weights}. */
    static double[][] repeat(double[] weights, int n) {
        double[][] out = new double[n][];
        for (int i = 0; i < n; i++) {
            out[i] = weights.clone();
        }
        return out;
    }

    static List<Entry> entries(List<DecisionRecord> records) {
        List<Entry> entries = new ArrayList<>();
        for (int i = 0; i < records.size(); i++) {
            entries.add(Entry.valid(Position.line(i + 1), null, records.get(i)));
        }
        return entries;
    }

    private static void draw(UniformRandomProvider rng, double[] served, int n, long[] trials, long[] successes) {
        List<Integer> indexes = new ArrayList<>();
        for (int i = 0; i < served.length; i++) {
            indexes.add(i);
        }
        DiscreteProbabilityCollectionSampler<Integer> arm = new DiscreteProbabilityCollectionSampler<>(rng, indexes,
                served);
        for (int j = 0; j < n; j++) {
            int i = arm.sample();
            trials[i]++;
            if (rng.nextDouble() < 0.1) {
                successes[i]++;
            }
        }
    }

    static DecisionRecord record(ExperimentDefinition def, long sequence, long time, long[] trials,
                                         long[] successes, double[] weights, boolean stop) {
        List<ArmState> arms = new ArrayList<>();
        for (int i = 0; i < trials.length; i++) {
            arms.add(ArmState.newBuilder().setArm(def.getArms().get(i)).setTrials(trials[i])
                    .setSuccesses(successes[i])
                    .setPosterior(new BetaParams(1.0 + successes[i], 1.0 + trials[i] - successes[i]))
                    .setAlpha(weights[i]).setAlphaStandardError(0.0)
                    .setWeightBeforeGuards(weights[i]).setWeight(weights[i]).build());
        }
        return DecisionRecord.newBuilder()
                .setExperimentId(def.getExperimentId())
                .setDefinitionVersion(def.getVersion())
                .setSequence(sequence)
                .setStreamTime(time)
                .setDefinition(def)
                .setArms(arms)
                .setAllocationRule(AllocationRule.TOP_TWO_THOMPSON)
                .setAllocationBeta(0.5)
                .setGuards(List.of())
                .setStoppingRule(StoppingRule.GLR)
                .setDelta(def.getStopping().getDelta())
                .setDecision(stop ? Decision.STOP : Decision.CONTINUE)
                .setWinner(stop ? def.getArms().get(0) : null)
                .setReason(stop ? "threshold-reached" : "below-threshold")
                .setStatistic(stop ? 9.0 : 1.0)
                .setThreshold(5.0)
                .setSeed(sequence)
                .setDraws(0)
                .setMethod(EstimationMethod.EXACT)
                .setEngineVersion("test")
                .setPreviousHash(HashChain.GENESIS)
                .build();
    }
}
