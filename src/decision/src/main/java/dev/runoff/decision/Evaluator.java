package dev.runoff.decision;

import dev.runoff.engine.stopping.LeaderWithin;

import dev.runoff.engine.AllocationEngine;
import dev.runoff.engine.EngineConfig;
import dev.runoff.engine.EngineVersion;
import dev.runoff.engine.core.Arm;
import dev.runoff.engine.Evaluation;
import dev.runoff.engine.allocation.GuardFlag;
import dev.runoff.engine.best.ProbabilityBest;
import dev.runoff.engine.posterior.Posterior;
import dev.runoff.engine.stopping.Verdict;
import dev.runoff.engine.stopping.StoppingCheck;
import dev.runoff.engine.stopping.Timing;
import dev.runoff.records.HashChain;
import dev.runoff.records.avro.AllocationUpdate;
import dev.runoff.records.avro.ArmWeight;
import dev.runoff.records.avro.DecisionRecord;
import dev.runoff.records.avro.ExperimentDefinition;
import dev.runoff.records.avro.ExperimentStatus;
import dev.runoff.records.avro.Guard;
import java.time.Instant;
import java.util.ArrayList;
import java.util.List;

/**
 * One evaluation of one experiment: the engine's weights, the stopping decision, the sealed decision record
 * and the control record, and the experiment's next state. A pure function of (state, now): no clock, no
 * randomness besides the seed derived by {@link Seeds#of} from the experiment id and the decision's sequence.
 *
 * <p>Inputs of the engine: the arms in definition order, {@link DefinitionConfigs#engine}, the seed, and the
 * previous weights: the weights of the previous decision record when it had the same arms in the same order
 * and the same metric kind, else none.
 * Inputs of the stopping rule: the same arms, the engine's probability of being best (see {@link #bounded}),
 * {@link Timing} from the time the first statistics were folded (this evaluation's time when none were) to
 * now, {@link DefinitionConfigs#stopping}, and {@link LeaderWithin} for the indifference rule. The decision
 * record holds all of them, that start time as {@code startedAt}, so a verifier can re-check the
 * minimum-duration guard exactly.
 *
 * <p>Guardrails ({@link GuardrailFindings}, tested with the reference chosen from the evaluation of every
 * arm): arms that fail one are left out of a second evaluation that gives the weights and feeds the stopping
 * rule ({@link Narrowing}), and {@link Ruling} holds back or redirects a STOP whose leader has not passed them. Their counts are inputs the
 * decision record holds per arm.
 *
 * <p>On STOP the published weights follow {@link AfterStopWeights} and the record lists the {@code AFTER_STOP}
 * guard; the experiment then keeps its winner: {@link #heartbeat} re-publishes the stopped state without
 * evaluating again.
 */
public final class Evaluator {

    /** Largest rounding error of a probability of being best that {@link #bounded} absorbs. */
    public static final double ROUNDING = 1e-9;

    private final AllocationEngine engine;
    private final int draws;

    /**
     * An evaluator of the current engine version using at most {@code draws} Monte Carlo draws where the engine
     * chooses Monte Carlo.
     *
     * @throws IllegalArgumentException when {@code draws < 1}
     */
    public Evaluator(int draws) {
        this(draws, EngineVersion.CURRENT);
    }

    /**
     * An evaluator computing with engine {@code version} (the audit recomputes a record with the version it
     * names), using at most {@code draws} Monte Carlo draws.
     *
     * @throws IllegalArgumentException when {@code draws < 1}
     */
    public Evaluator(int draws, EngineVersion version) {
        if (draws < 1) {
            throw new IllegalArgumentException("draws must be >= 1, got " + draws);
        }
        this.engine = new AllocationEngine(version);
        this.draws = draws;
    }

    /**
     * Evaluates a running experiment at {@code now}.
     *
     * @throws IllegalStateException    when the experiment has stopped
     * @throws IllegalArgumentException when the engine or the stopping rule rejects the input
     */
    public Result evaluate(ExperimentState state, long now) {
        if (state.stopped()) {
            throw new IllegalStateException("experiment '" + state.experimentId() + "' has stopped; use heartbeat");
        }
        ExperimentDefinition def = state.definition();
        long sequence = state.decisionSequence() + 1;
        long seed = Seeds.of(state.experimentId(), sequence);
        List<Arm> arms = state.arms();
        EngineConfig config = DefinitionConfigs.engine(def, draws);
        Evaluation full = engine.evaluate(arms, config, seed, state.lastWeights());
        GuardrailFindings findings = GuardrailFindings.of(state, bounded(full.probabilityBest()));
        Narrowing narrowed = Narrowing.of(engine, arms, config, seed, state.lastWeights(), full, findings);
        Evaluation evaluation = narrowed.evaluation();
        ProbabilityBest best = bounded(evaluation.probabilityBest());
        long start = start(state, now);
        Ruling decision = Ruling.of(decide(state, narrowed.kept(), narrowed.keptEval(),
                bounded(narrowed.keptEval().probabilityBest()), start, now), findings, def.getArms());
        double[] weights = findings.suspend(evaluation.weights());
        ExperimentState.Stop stop = null;
        List<Guard> guards = guards(evaluation);
        if (decision.stop()) {
            weights = AfterStopWeights.weights(def, decision.winner(), state.lastWeights(), weights);
            stop = new ExperimentState.Stop(decision.winner(), def.getVersion(), def.getArms(), weights);
            guards.add(Guard.AFTER_STOP);
        }
        DecisionRecord record = HashChain.seal(Records.decision(state, sequence, start, now, evaluation, best,
                decision, weights, guards, findings), state.lastHash());
        ExperimentState next = state.evaluated(now, record.getHash(), weights, stop);
        AllocationUpdate update = stop == null
                ? Records.update(next, def.getVersion(), def.getArms(), weights, now, ExperimentStatus.RUNNING, null)
                : heartbeatUpdate(next, now);
        return new Result(record, update, next);
    }

    /** The start of the stopping rule's {@link Timing}: when the first statistics were folded, at most now. */
    private static long start(ExperimentState state, long now) {
        return state.startedAt() < 0 ? now : Math.min(state.startedAt(), now);
    }

    private static Verdict decide(ExperimentState state, List<Arm> arms, Evaluation evaluation,
                                   ProbabilityBest best, long start, long now) {
        List<Posterior> posteriors = evaluation.posteriors().stream().map(Evaluation.PosteriorSummary::posterior)
                .toList();
        return StoppingCheck.decide(arms, best, new Timing(Instant.ofEpochMilli(start), Instant.ofEpochMilli(now)),
                DefinitionConfigs.stopping(state.definition()), LeaderWithin.of(posteriors));
    }

    /**
     * Re-publishes the stopped state of {@code state} at {@code now}: a control record with the next
     * allocation sequence, the after-stop weights and a renewed validity; no evaluation.
     *
     * @throws IllegalStateException when the experiment has not stopped
     */
    public Republished heartbeat(ExperimentState state, long now) {
        if (!state.stopped()) {
            throw new IllegalStateException("experiment '" + state.experimentId() + "' is running; use evaluate");
        }
        ExperimentState next = state.republished(now);
        return new Republished(heartbeatUpdate(next, now), next);
    }

    private static AllocationUpdate heartbeatUpdate(ExperimentState next, long now) {
        ExperimentState.Stop stop = next.stop();
        return Records.update(next, stop.definitionVersion(), stop.arms(), stop.weights(), now,
                ExperimentStatus.STOPPED, stop.winner());
    }

    /**
     * The engine's probabilities of being best with values that numerical integration put at most
     * {@value #ROUNDING} outside [0, 1] moved onto the bound (measured: 1 + 4.7e-11 for a dominant arm). The
     * stopping rule and the decision record see these values; the engine's weights are computed from its
     * own. Values further outside are left as they are, for the stopping rule to reject.
     */
    public static ProbabilityBest bounded(ProbabilityBest best) {
        double[] alpha = best.alpha();
        for (int i = 0; i < alpha.length; i++) {
            if (alpha[i] > 1 && alpha[i] <= 1 + ROUNDING) {
                alpha[i] = 1.0;
            } else if (alpha[i] < 0 && alpha[i] >= -ROUNDING) {
                alpha[i] = 0.0;
            }
        }
        return new ProbabilityBest(alpha, best.standardError(), best.method(), best.draws(), best.conditional());
    }

    /** The guards that changed the weights, in the order the engine applies them. */
    private static List<Guard> guards(Evaluation evaluation) {
        List<Guard> guards = new ArrayList<>(5);
        for (GuardFlag flag : GuardFlag.values()) {
            if (evaluation.flags().contains(flag)) {
                guards.add(flag == GuardFlag.CAP ? Guard.MAX_STEP : Guard.valueOf(flag.name()));
            }
        }
        return guards;
    }

    /**
     * The outputs of one evaluation.
     *
     * @param decision the sealed decision record; its definition is the state's own object, not a copy
     * @param update   the control record
     * @param next     the experiment's state afterwards
     */
    public record Result(DecisionRecord decision, AllocationUpdate update, ExperimentState next) {
    }

    /**
     * The outputs of a heartbeat of a stopped experiment.
     *
     * @param update the control record
     * @param next   the experiment's state afterwards
     */
    public record Republished(AllocationUpdate update, ExperimentState next) {
    }

    /** Builders of the output records. */
    private static final class Records {
        private Records() {
        }

        /** The decision record's fields but the seal's, on a builder that nothing else holds. */
        static DecisionRecord.Builder decision(ExperimentState state, long sequence, long start, long now,
                                       Evaluation evaluation, ProbabilityBest best, Ruling decision,
                                       double[] weights, List<Guard> guards, GuardrailFindings findings) {
            ExperimentDefinition def = state.definition();
            return DecisionRecord.newBuilder()
                    .setExperimentId(state.experimentId())
                    .setDefinitionVersion(def.getVersion())
                    .setSequence(sequence)
                    .setStreamTime(now)
                    .setStartedAt(start)
                    .setDefinition(def)
                    .setArms(ArmStates.of(state, evaluation, best, weights, findings))
                    .setAllocationRule(dev.runoff.records.avro.AllocationRule.valueOf(evaluation.rule().name()))
                    .setAllocationBeta(evaluation.beta())
                    .setGuards(guards)
                    .setStoppingRule(def.getStopping().getRule())
                    .setDelta(def.getStopping().getDelta())
                    .setEpsilon(def.getStopping().getEpsilon())
                    .setDecision(decision.stop() ? dev.runoff.records.avro.Decision.STOP
                            : dev.runoff.records.avro.Decision.CONTINUE)
                    .setWinner(decision.winner())
                    .setReason(decision.reason())
                    .setStatistic(decision.statistic())
                    .setThreshold(decision.threshold())
                    .setSeed(evaluation.seed())
                    .setDraws(best.draws())
                    .setMethod(dev.runoff.records.avro.EstimationMethod.valueOf(evaluation.method().name()))
                    .setEngineVersion(evaluation.engineVersion());
        }

        static AllocationUpdate update(ExperimentState next, long version, List<String> arms, double[] weights,
                                       long now, ExperimentStatus status, String winner) {
            List<ArmWeight> list = new ArrayList<>(arms.size());
            for (int i = 0; i < arms.size(); i++) {
                list.add(new ArmWeight(arms.get(i), weights[i]));
            }
            long validFor = next.definition().getValidForMs();
            long validUntil = now > Long.MAX_VALUE - validFor ? Long.MAX_VALUE : now + validFor;
            return AllocationUpdate.newBuilder()
                    .setExperimentId(next.experimentId())
                    .setDefinitionVersion(version)
                    .setSequence(next.allocationSequence())
                    .setWeights(list)
                    .setComputedAt(now)
                    .setValidUntil(validUntil)
                    .setStatus(status)
                    .setWinner(winner)
                    .build();
        }
    }
}
