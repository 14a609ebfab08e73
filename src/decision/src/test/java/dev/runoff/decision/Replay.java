package dev.runoff.decision;

import dev.runoff.engine.stopping.LeaderWithin;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;

import dev.runoff.engine.AllocationEngine;
import dev.runoff.engine.core.Arm;
import dev.runoff.engine.EngineConfig;
import dev.runoff.engine.Evaluation;
import dev.runoff.engine.allocation.AllocationMethod;
import dev.runoff.engine.allocation.Guards;
import dev.runoff.engine.best.ProbabilityBest;
import dev.runoff.engine.posterior.BetaPrior;
import dev.runoff.engine.posterior.NormalGammaPrior;
import dev.runoff.engine.posterior.Posterior;
import dev.runoff.engine.posterior.Prior;
import dev.runoff.engine.stats.BernoulliStats;
import dev.runoff.engine.stats.ValueStats;
import dev.runoff.engine.stopping.Verdict;
import dev.runoff.engine.stopping.StoppingCheck;
import dev.runoff.engine.stopping.Timing;
import dev.runoff.records.avro.AllocationSpec;
import dev.runoff.records.avro.ArmState;
import dev.runoff.records.avro.BetaParams;
import dev.runoff.records.avro.DecisionRecord;
import dev.runoff.records.avro.ExperimentDefinition;
import dev.runoff.records.avro.MetricKind;
import dev.runoff.records.avro.NormalGammaPriorSpec;
import java.nio.ByteBuffer;
import java.nio.charset.StandardCharsets;
import java.security.MessageDigest;
import java.time.Instant;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;

/**
 * An auditor's recomputation of decision records from their content alone: it rebuilds the arms, the
 * engine configuration and the seed from the record and its definition, by hand (not through the job's own
 * mapping), and requires the same bits.
 */
public final class Replay {

    private Replay() {
    }

    /** Recomputes every record of one experiment's chain, in order. */
    public static void assertChainReplays(List<DecisionRecord> chain) {
        double[] previous = null;
        List<String> previousArms = null;
        MetricKind previousKind = null;
        for (DecisionRecord record : chain) {
            List<String> names = record.getArms().stream().map(ArmState::getArm).toList();
            MetricKind kind = record.getDefinition().getMetric().getKind();
            boolean sameArms = names.equals(previousArms) && kind == previousKind;
            assertReplays(record, sameArms ? previous : null);
            previous = record.getArms().stream().mapToDouble(ArmState::getWeight).toArray();
            previousArms = names;
            previousKind = kind;
        }
    }

    /** Recomputes one record with the weights published before it ({@code null}: none). */
    public static void assertReplays(DecisionRecord record, double[] previousWeights) {
        String where = record.getExperimentId() + " #" + record.getSequence();
        assertEquals(seed(record.getExperimentId(), record.getSequence()), record.getSeed(), where + " seed");
        List<Arm> arms = arms(record);
        ExperimentDefinition def = record.getDefinition();
        EngineConfig config = config(def, record.getDraws() == 0 ? EngineConfig.DEFAULT_DRAWS : record.getDraws());
        Evaluation evaluation = new AllocationEngine().evaluate(arms, config, record.getSeed(), previousWeights);
        assertEquals(record.getMethod().name(), evaluation.method().name(), where + " method");
        double[] alpha = record.getArms().stream().mapToDouble(ArmState::getAlpha).toArray();
        double[] se = record.getArms().stream().mapToDouble(ArmState::getAlphaStandardError).toArray();
        double[] before = record.getArms().stream().mapToDouble(ArmState::getWeightBeforeGuards).toArray();
        double[] after = record.getArms().stream().mapToDouble(ArmState::getWeight).toArray();
        // Alphas that integration put a rounding error outside [0, 1] are recorded on the bound (Evaluator.bounded).
        ProbabilityBest best = Evaluator.bounded(evaluation.probabilityBest());
        assertArrayEquals(bits(best.alpha()), bits(alpha), where + " alpha");
        assertArrayEquals(bits(evaluation.probabilityBest().standardError()), bits(se), where + " standard errors");
        assertArrayEquals(bits(evaluation.ruleWeights()), bits(before), where + " weights before guards");
        boolean stop = record.getDecision() == dev.runoff.records.avro.Decision.STOP;
        double[] expected = stop ? afterStop(def, record.getWinner(), previousWeights, evaluation.weights())
                : evaluation.weights();
        assertArrayEquals(bits(expected), bits(after), where + " published weights");
        assertDecision(record, arms, evaluation, where);
    }

    /**
     * The statistic, threshold and decision. The record holds no start time, so the check assumes the
     * definition has no minimum duration (true of the test definitions).
     */
    private static void assertDecision(DecisionRecord record, List<Arm> arms, Evaluation evaluation, String where) {
        assertEquals(0L, record.getDefinition().getStopping().getMinDurationMs(), where + " needs minDurationMs 0");
        Instant at = Instant.ofEpochMilli(record.getStreamTime());
        List<Posterior> posteriors = evaluation.posteriors().stream().map(Evaluation.PosteriorSummary::posterior)
                .toList();
        ProbabilityBest best = Evaluator.bounded(evaluation.probabilityBest());
        Verdict decision = StoppingCheck.decide(arms, best, new Timing(at, at),
                DefinitionConfigs.stopping(record.getDefinition()), LeaderWithin.of(posteriors));
        assertEquals(Double.doubleToLongBits(decision.statistic()), Double.doubleToLongBits(record.getStatistic()),
                where + " statistic");
        assertEquals(Double.doubleToLongBits(decision.threshold()), Double.doubleToLongBits(record.getThreshold()),
                where + " threshold");
        assertEquals(decision.isStop() ? "STOP" : "CONTINUE", record.getDecision().name(), where + " decision");
        assertEquals(DecisionReasons.of(decision), record.getReason(), where + " reason");
    }

    /** First 8 bytes of SHA-256(experimentId ":" sequence), big-endian, computed here independently. */
    static long seed(String experimentId, long sequence) {
        try {
            byte[] digest = MessageDigest.getInstance("SHA-256")
                    .digest((experimentId + ":" + sequence).getBytes(StandardCharsets.UTF_8));
            return ByteBuffer.wrap(digest, 0, 8).getLong();
        } catch (java.security.NoSuchAlgorithmException e) {
            throw new IllegalStateException(e);
        }
    }

    private static List<Arm> arms(DecisionRecord record) {
        boolean bernoulli = record.getDefinition().getMetric().getKind() == MetricKind.BERNOULLI;
        List<Arm> arms = new ArrayList<>();
        for (ArmState s : record.getArms()) {
            arms.add(new Arm(s.getArm(), bernoulli ? new BernoulliStats(s.getTrials(), s.getSuccesses())
                    : new ValueStats(s.getTrials(), s.getMean(), s.getM2())));
        }
        return arms;
    }

    private static EngineConfig config(ExperimentDefinition def, int draws) {
        AllocationSpec a = def.getAllocation();
        Guards.ControlShare control = a.getControlShare() == null ? null
                : new Guards.ControlShare(def.getControlArm(), a.getControlShare());
        Guards guards = new Guards(a.getWarmUpTrials(), a.getFloor(), control,
                a.getMaxStep() == null ? 1.0 : a.getMaxStep());
        return new EngineConfig(prior(def), AllocationMethod.valueOf(a.getRule().name()), a.getBeta(),
                method(a), draws, guards);
    }

    /** The schema's documented default: a null bestArmEstimator means SAMPLED (Monte Carlo). */
    private static EngineConfig.MethodChoice method(AllocationSpec a) {
        return a.getBestArmEstimator() == dev.runoff.records.avro.BestArmEstimator.INTEGRATED
                ? EngineConfig.MethodChoice.EXACT : EngineConfig.MethodChoice.MONTE_CARLO;
    }

    private static Prior prior(ExperimentDefinition def) {
        Object p = def.getMetric().getPrior();
        if (p instanceof BetaParams b) {
            return new BetaPrior(b.getA(), b.getB());
        }
        if (p instanceof NormalGammaPriorSpec n) {
            return new NormalGammaPrior(n.getMu0(), n.getKappa0(), n.getAlpha0(), n.getBeta0());
        }
        // The schema's documented defaults: Beta(1, 1), Normal-Gamma(0, 0.001, 1, 0.001).
        return def.getMetric().getKind() == MetricKind.BERNOULLI ? new BetaPrior(1, 1)
                : new NormalGammaPrior(0, 0.001, 1, 0.001);
    }

    private static double[] afterStop(ExperimentDefinition def, String winner, double[] previous, double[] evaluated) {
        double[] w = new double[def.getArms().size()];
        switch (def.getAfterStop()) {
            case ALL_TO_WINNER -> w[def.getArms().indexOf(winner)] = 1;
            case ALL_TO_CONTROL -> w[def.getArms().indexOf(def.getControlArm())] = 1;
            case KEEP_WEIGHTS -> w = previous != null ? previous : evaluated;
        }
        return w;
    }

    private static long[] bits(double[] values) {
        return Arrays.stream(values).mapToLong(Double::doubleToLongBits).toArray();
    }
}
