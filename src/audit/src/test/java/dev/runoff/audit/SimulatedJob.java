package dev.runoff.audit;

import dev.runoff.engine.stats.BernoulliStats;
import dev.runoff.records.avro.AfterStopPolicy;
import dev.runoff.records.avro.AllocationRule;
import dev.runoff.records.avro.AllocationSpec;
import dev.runoff.records.avro.ArmState;
import dev.runoff.records.avro.DecisionRecord;
import dev.runoff.records.avro.EventType;
import dev.runoff.records.avro.ExperimentDefinition;
import dev.runoff.records.avro.MetricKind;
import dev.runoff.records.avro.MetricSpec;
import dev.runoff.records.avro.StoppingRule;
import dev.runoff.records.avro.StoppingSpec;
import dev.runoff.decision.Evaluator;
import dev.runoff.engine.EngineVersion;
import dev.runoff.decision.ExperimentState;
import java.util.ArrayList;
import java.util.List;
import java.util.function.IntFunction;
import org.apache.commons.rng.UniformRandomProvider;
import org.apache.commons.rng.simple.RandomSource;

/**
 * The job's evaluation without Kafka: the topology's {@link Evaluator} and {@link ExperimentState}, fed each
 * period with exposures that a serving tier draws from the weights last published (clicks drawn from fixed
 * rates), so that the records are genuine decisions of the job's code and follow their weights. Each period
 * also leaves a tenth of its units pending, so the records report pending units as the job's do.
 */
final class SimulatedJob {

    static final long PERIOD_MS = 60_000;

    private SimulatedJob() {
    }

    /**
     * A Bernoulli definition (version 1): EXPOSURE trials and CLICK successes, top-two Thompson with a 20-trial
     * warm-up and a 0.2 step cap, GLR with delta 0.05 and 50 trials per arm, ALL_TO_WINNER after the stop.
     */
    static ExperimentDefinition definition(String id, List<String> arms, long minDurationMs) {
        return ExperimentDefinition.newBuilder()
                .setExperimentId(id)
                .setVersion(1)
                .setArms(arms)
                .setMetric(MetricSpec.newBuilder().setKind(MetricKind.BERNOULLI).setTrialEvent(EventType.EXPOSURE)
                        .setSuccessEvent(EventType.CLICK).build())
                .setAllocation(AllocationSpec.newBuilder().setRule(AllocationRule.TOP_TWO_THOMPSON).setWarmUpTrials(20)
                        .setMaxStep(0.2).build())
                .setStopping(StoppingSpec.newBuilder().setRule(StoppingRule.GLR).setDelta(0.05).setMinTrialsPerArm(50)
                        .setMinDurationMs(minDurationMs).build())
                .setAfterStop(AfterStopPolicy.ALL_TO_WINNER)
                .setRecomputePeriodMs(PERIOD_MS)
                .build();
    }

    /**
     * Runs up to {@code rounds} periods after a first evaluation at {@link Chains#T0} with no data, stopping
     * early at a STOP. Each period serves {@code exposures} units, arm drawn from the weights in force.
     */
    static List<DecisionRecord> run(ExperimentDefinition definition, double[] clickRates, int rounds, int exposures,
                                    long seed) {
        return run(definition, round -> clickRates, rounds, exposures, seed);
    }

    /** As above with the click rates of each round (0 for the first period) given by {@code ratesOfRound}. */
    static List<DecisionRecord> run(ExperimentDefinition definition, IntFunction<double[]> ratesOfRound, int rounds,
                                    int exposures, long seed) {
        return run(definition, ratesOfRound, rounds, exposures, seed, EngineVersion.CURRENT);
    }

    /** As above, the job computing with engine {@code version}. */
    static List<DecisionRecord> run(ExperimentDefinition definition, IntFunction<double[]> ratesOfRound, int rounds,
                                    int exposures, long seed, EngineVersion version) {
        return run(definition, ratesOfRound, rounds, exposures, seed, new Evaluator(2_000, version));
    }

    /** As above, the job evaluating with {@code evaluator}. */
    static List<DecisionRecord> run(ExperimentDefinition definition, IntFunction<double[]> ratesOfRound, int rounds,
                                    int exposures, long seed, Evaluator evaluator) {
        UniformRandomProvider rng = RandomSource.SPLIT_MIX_64.create(seed);
        long now = Chains.T0;
        Evaluator.Result result = evaluator.evaluate(ExperimentState.start(definition), now);
        List<DecisionRecord> records = new ArrayList<>(List.of(result.decision()));
        for (int r = 0; r < rounds && !result.next().stopped(); r++) {
            double[] weights = result.decision().getArms().stream().mapToDouble(ArmState::getWeight).toArray();
            ExperimentState state = result.next();
            long[][] counts = serve(rng, weights, ratesOfRound.apply(r), exposures);
            now += PERIOD_MS;
            for (int i = 0; i < weights.length; i++) {
                // a tenth of the period's units still pending (unit counting): records report pending > 0
                state = state.withDelta(i, new BernoulliStats(counts[0][i], counts[1][i]), counts[0][i] / 10,
                        now - PERIOD_MS / 2);
            }
            result = evaluator.evaluate(state, now);
            records.add(result.decision());
        }
        return records;
    }

    /** Trials and successes per arm of {@code n} units, each arm drawn from {@code weights}. */
    private static long[][] serve(UniformRandomProvider rng, double[] weights, double[] rates, int n) {
        long[][] counts = new long[2][weights.length];
        for (int u = 0; u < n; u++) {
            int arm = pick(rng.nextDouble(), weights);
            counts[0][arm]++;
            if (rng.nextDouble() < rates[arm]) {
                counts[1][arm]++;
            }
        }
        return counts;
    }

    /** The arm that uniform draw {@code u} selects from {@code weights} (never an arm of weight 0). */
    static int pick(double u, double[] weights) {
        double sum = 0;
        for (int i = 0; i < weights.length; i++) {
            sum += weights[i];
            if (u < sum) {
                return i;
            }
        }
        int last = weights.length - 1;
        while (weights[last] == 0) {
            last--;
        }
        return last;
    }
}
