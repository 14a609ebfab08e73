package dev.runoff.decision;

import dev.runoff.engine.stopping.LeaderWithin;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;

import dev.runoff.engine.AllocationEngine;
import dev.runoff.engine.core.Arm;
import dev.runoff.engine.EngineConfig;
import dev.runoff.engine.EngineVersion;
import dev.runoff.engine.Evaluation;
import dev.runoff.engine.allocation.AllocationMethod;
import dev.runoff.engine.allocation.Guards;
import dev.runoff.engine.best.LeaderThreshold;
import dev.runoff.engine.best.ProbabilityBest;
import dev.runoff.engine.posterior.BetaPrior;
import dev.runoff.engine.posterior.NormalGammaPrior;
import dev.runoff.engine.posterior.Posterior;
import dev.runoff.engine.posterior.Prior;
import dev.runoff.engine.stats.BernoulliStats;
import dev.runoff.engine.guardrail.Direction;
import dev.runoff.engine.guardrail.MarginCheck;
import dev.runoff.engine.stats.ValueStats;
import dev.runoff.engine.stopping.Verdict;
import dev.runoff.engine.stopping.StoppingCheck;
import dev.runoff.engine.stopping.Timing;
import dev.runoff.records.avro.AllocationSpec;
import dev.runoff.records.avro.ArmState;
import dev.runoff.records.avro.BetaParams;
import dev.runoff.records.avro.DecisionRecord;
import dev.runoff.records.avro.ExperimentDefinition;
import dev.runoff.records.avro.GuardrailOutcome;
import dev.runoff.records.avro.GuardrailSpec;
import dev.runoff.records.avro.GuardrailState;
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
        AllocationEngine engine = new AllocationEngine(EngineVersion.of(record.getEngineVersion()));
        Evaluation full = engine.evaluate(arms, config, record.getSeed(), previousWeights);
        double[] fullAlpha = Evaluator.bounded(full.probabilityBest()).alpha();
        String[] suspendedBy = guardrails(record, fullAlpha, where);
        // suspended arms are left out of the engine's second evaluation and of the stopping rule (at least two kept)
        List<Integer> kept = new ArrayList<>();
        for (int i = 0; i < arms.size(); i++) {
            if (suspendedBy[i] == null) {
                kept.add(i);
            }
        }
        boolean narrow = kept.size() >= 2 && kept.size() < arms.size();
        List<Arm> keptArms = narrow ? kept.stream().map(arms::get).toList() : arms;
        Evaluation evaluation = narrow ? engine.evaluate(keptArms, config, record.getSeed(),
                Narrowing.previous(previousWeights, kept)) : full;
        List<Integer> index = narrow ? kept : java.util.stream.IntStream.range(0, arms.size()).boxed().toList();
        assertEquals(record.getMethod().name(), evaluation.method().name(), where + " method");
        double[] alpha = record.getArms().stream().mapToDouble(ArmState::getAlpha).toArray();
        double[] se = record.getArms().stream().mapToDouble(ArmState::getAlphaStandardError).toArray();
        double[] before = record.getArms().stream().mapToDouble(ArmState::getWeightBeforeGuards).toArray();
        double[] after = record.getArms().stream().mapToDouble(ArmState::getWeight).toArray();
        // Alphas that integration put a rounding error outside [0, 1] are recorded on the bound (Evaluator.bounded).
        ProbabilityBest best = Evaluator.bounded(evaluation.probabilityBest());
        int n = arms.size();
        assertArrayEquals(bits(spread(best.alpha(), index, n)), bits(alpha), where + " alpha");
        assertArrayEquals(bits(spread(evaluation.probabilityBest().standardError(), index, n)), bits(se),
                where + " standard errors");
        assertArrayEquals(bits(spread(evaluation.ruleWeights(), index, n)), bits(before), where + " weights before guards");
        boolean stop = record.getDecision() == dev.runoff.records.avro.Decision.STOP;
        double[] running = withoutSuspended(spread(evaluation.weights(), index, n), suspendedBy,
                reference(record, fullAlpha));
        double[] expected = stop ? afterStop(def, record.getWinner(), previousWeights, running) : running;
        assertArrayEquals(bits(expected), bits(after), where + " published weights");
        assertDecision(record, keptArms, evaluation, suspendedBy, reference(record, fullAlpha), where);
    }

    /** {@code values} of the arms {@code index} placed at those positions of {@code n}, 0 elsewhere. */
    private static double[] spread(double[] values, List<Integer> index, int n) {
        double[] out = new double[n];
        for (int k = 0; k < index.size(); k++) {
            out[index.get(k)] = values[k];
        }
        return out;
    }

    /**
     * Each arm's guardrail entries recomputed from its counts with the engine's margin check against the
     * reference (the control, else the arm with the largest alpha); returns per arm the first guardrail it
     * FAILED, or null.
     */
    private static String[] guardrails(DecisionRecord record, double[] alpha, String where) {
        List<GuardrailSpec> specs = record.getDefinition().getGuardrails() == null ? List.of()
                : record.getDefinition().getGuardrails();
        String[] suspendedBy = new String[record.getArms().size()];
        int reference = reference(record, alpha);
        for (int a = 0; a < suspendedBy.length; a++) {
            ArmState arm = record.getArms().get(a);
            for (int g = 0; g < specs.size(); g++) {
                GuardrailSpec spec = specs.get(g);
                GuardrailState recorded = arm.getGuardrails().get(g);
                GuardrailState ref = record.getArms().get(reference).getGuardrails().get(g);
                String at = where + " arm " + arm.getArm() + " guardrail " + spec.getName();
                if (a == reference) {
                    assertEquals(GuardrailOutcome.REFERENCE, recorded.getOutcome(), at);
                    continue;
                }
                MarginCheck.Result r = MarginCheck.check(observed(recorded, spec), observed(ref, spec),
                        Direction.valueOf(spec.getDirection().name()), spec.getMargin(), spec.getAlpha());
                assertEquals(r.outcome().name(), recorded.getOutcome().name(), at);
                assertArrayEquals(bits(new double[] {r.arm().lower(), r.arm().upper(), r.statistic(), r.threshold()}),
                        bits(new double[] {recorded.getLower(), recorded.getUpper(), recorded.getStatistic(),
                                recorded.getThreshold()}), at + " bounds");
                if (suspendedBy[a] == null && r.outcome() == MarginCheck.Outcome.FAIL) {
                    suspendedBy[a] = spec.getName();
                }
            }
            assertEquals(suspendedBy[a], arm.getSuspendedBy(), where + " arm " + arm.getArm() + " suspendedBy");
        }
        return suspendedBy;
    }

    /** A rate guardrail's units and hits, or a value guardrail's units and total of capped values over the cap. */
    private static MarginCheck.Totals observed(GuardrailState state, GuardrailSpec spec) {
        return new MarginCheck.Totals(state.getCounted(), spec.getValueCap() == null ? state.getHits()
                : state.getTotal());
    }

    private static int reference(DecisionRecord record, double[] alpha) {
        String control = record.getDefinition().getControlArm();
        if (control != null) {
            return record.getDefinition().getArms().indexOf(control);
        }
        int best = 0;
        for (int i = 1; i < alpha.length; i++) {
            best = alpha[i] > alpha[best] ? i : best;
        }
        return best;
    }

    private static double[] withoutSuspended(double[] weights, String[] suspendedBy, int reference) {
        if (Arrays.stream(suspendedBy).allMatch(java.util.Objects::isNull)) {
            return weights;
        }
        double[] w = weights.clone();
        double kept = 0;
        for (int i = 0; i < w.length; i++) {
            w[i] = suspendedBy[i] != null ? 0 : w[i];
            kept += w[i];
        }
        if (kept == 0) {
            w[reference] = 1;
            return w;
        }
        for (int i = 0; i < w.length; i++) {
            w[i] /= kept;
        }
        return w;
    }

    /**
     * The statistic, threshold and decision. The record holds no start time, so the check assumes the
     * definition has no minimum duration (true of the test definitions).
     */
    private static void assertDecision(DecisionRecord record, List<Arm> arms, Evaluation evaluation,
                                       String[] suspendedBy, int reference, String where) {
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
        int leader = record.getDefinition().getArms().indexOf(decision.leaderName());
        boolean cleared = !decision.isStop() || record.getArms().get(leader).getGuardrails() == null
                || record.getArms().get(leader).getGuardrails().stream()
                        .allMatch(g -> g.getOutcome() == GuardrailOutcome.PASS || g.getOutcome() == GuardrailOutcome.REFERENCE);
        boolean budget = decision.reason() == dev.runoff.engine.stopping.VerdictReason.BUDGET
                || decision.guards().budgetExhausted();
        boolean stop = decision.isStop() && (cleared || budget);
        assertEquals(stop ? "STOP" : "CONTINUE", record.getDecision().name(), where + " decision");
        String reason = cleared ? DecisionReasons.of(decision)
                : budget ? (decision.guards().trialBudgetSpent() ? "budget" : "deadline")
                : suspendedBy[leader] != null ? "guardrail-failed" : "guardrail-open";
        assertEquals(reason, record.getReason(), where + " reason");
        if (stop) {
            String winner = cleared ? decision.leaderName() : record.getDefinition().getArms().get(reference);
            assertEquals(winner, record.getWinner(), where + " winner");
        }
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
                method(a), draws, guards, leaderThreshold(def));
    }

    /** The posterior rule's threshold on the leader's alpha, 1 - delta at z = 3 (the job's z); none for the others. */
    private static LeaderThreshold leaderThreshold(ExperimentDefinition def) {
        return def.getStopping().getRule() == dev.runoff.records.avro.StoppingRule.POSTERIOR
                ? new LeaderThreshold(1 - def.getStopping().getDelta(), 3.0) : null;
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
