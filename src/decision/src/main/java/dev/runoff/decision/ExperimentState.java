package dev.runoff.decision;

import dev.runoff.engine.core.Arm;
import dev.runoff.engine.core.Metric;
import dev.runoff.engine.stats.ArmStats;
import dev.runoff.engine.stats.BernoulliStats;
import dev.runoff.engine.stats.ValueStats;
import dev.runoff.records.Definitions;
import dev.runoff.records.HashChain;
import dev.runoff.records.avro.ExperimentDefinition;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.Collections;
import java.util.List;
import java.util.Objects;

/**
 * What the job keeps per experiment: the definition in force (with its version), each arm's sufficient
 * statistics, the numbering and hash chain of its outputs, and when it was last evaluated and published.
 * Immutable; every change returns a new state.
 *
 * @param definition         the definition in force, with its assigned version
 * @param stats              each arm's statistics, in the definition's arm order
 * @param stop               the STOP that ended learning, or {@code null} while running
 * @param decisionSequence   sequence number of the last decision record (0 before the first)
 * @param allocationSequence sequence number of the last control record (0 before the first)
 * @param lastHash           hash of the last decision record ({@link HashChain#GENESIS} before the first)
 * @param lastWeights        the weights of the last evaluation, in arm order, or {@code null} when there is
 *                           none for the current arms
 * @param startedAt          when the first statistics were folded (ms since the epoch), or -1
 * @param lastComputedAt     time of the last evaluation, or -1
 * @param lastPublishedAt    time of the last control record, or -1
 * @param dirty              whether statistics changed since the last evaluation
 * @param due                whether the next allocation pass must evaluate (new experiment, new version)
 * @param pending            per arm, units exposed whose conversion window has not closed (unit counting), or
 *                           {@code null} when not known (records written before pending units were reported)
 * @param armSince           per arm, the definition version since which the arm has been in the definition
 *                           without interruption; statistics of units first exposed earlier are not merged
 * @param guardrails         per arm and guardrail, units counted and units with the guardrail's signal
 *                           ({@code null}: none counted yet)
 */
public record ExperimentState(ExperimentDefinition definition, List<ArmStats> stats, Stop stop,
                              long decisionSequence, long allocationSequence, String lastHash,
                              double[] lastWeights, long startedAt, long lastComputedAt, long lastPublishedAt,
                              boolean dirty, boolean due, long[] pending, long[] armSince,
                              GuardrailCounts guardrails) {

    /** Validates the shape: one statistics entry per arm, weights, pending units and arm starts alike. */
    public ExperimentState {
        Objects.requireNonNull(definition, "definition");
        stats = List.copyOf(stats);
        if (stats.size() != definition.getArms().size()) {
            throw new IllegalArgumentException("stats has " + stats.size() + " entries but experiment '"
                    + definition.getExperimentId() + "' has " + definition.getArms().size() + " arms");
        }
        Objects.requireNonNull(lastHash, "lastHash");
        if (lastWeights != null) {
            if (lastWeights.length != stats.size()) {
                throw new IllegalArgumentException("lastWeights has " + lastWeights.length + " entries for "
                        + stats.size() + " arms");
            }
            lastWeights = lastWeights.clone();
        }
        pending = pending == null ? null : perArm(pending, stats.size(), "pending");
        armSince = armSince == null ? new long[stats.size()] : perArm(armSince, stats.size(), "armSince");
        guardrails = guardrails == null ? GuardrailCounts.empty(definition) : guardrails;
        if (guardrails.counted().length != stats.size()) {
            throw new IllegalArgumentException("guardrails has " + guardrails.counted().length + " arms for "
                    + stats.size() + " arms");
        }
    }

    /** A state with no guardrail counts (none counted yet, or a definition without guardrails). */
    public ExperimentState(ExperimentDefinition definition, List<ArmStats> stats, Stop stop, long decisionSequence,
                           long allocationSequence, String lastHash, double[] lastWeights, long startedAt,
                           long lastComputedAt, long lastPublishedAt, boolean dirty, boolean due, long[] pending,
                           long[] armSince) {
        this(definition, stats, stop, decisionSequence, allocationSequence, lastHash, lastWeights, startedAt,
                lastComputedAt, lastPublishedAt, dirty, due, pending, armSince, null);
    }

    /**
     * A state whose pending units are unknown and whose arms all count from version 0 (every unit): what an
     * auditor rebuilds from a decision record.
     */
    public ExperimentState(ExperimentDefinition definition, List<ArmStats> stats, Stop stop, long decisionSequence,
                           long allocationSequence, String lastHash, double[] lastWeights, long startedAt,
                           long lastComputedAt, long lastPublishedAt, boolean dirty, boolean due) {
        this(definition, stats, stop, decisionSequence, allocationSequence, lastHash, lastWeights, startedAt,
                lastComputedAt, lastPublishedAt, dirty, due, null, null);
    }

    private static long[] perArm(long[] values, int arms, String name) {
        if (values.length != arms) {
            throw new IllegalArgumentException(name + " has " + values.length + " entries for " + arms + " arms");
        }
        return values.clone();
    }

    /** A new experiment: empty statistics, nothing published, due for its first evaluation. */
    public static ExperimentState start(ExperimentDefinition definition) {
        int arms = definition.getArms().size();
        long[] since = new long[arms];
        Arrays.fill(since, definition.getVersion());
        return new ExperimentState(definition, empty(definition, arms), null, 0, 0, HashChain.GENESIS, null, -1, -1,
                -1, false, true, new long[arms], since, null);
    }

    /** The experiment id. */
    public String experimentId() {
        return definition.getExperimentId();
    }

    /** Whether a STOP decision ended learning. */
    public boolean stopped() {
        return stop != null;
    }

    /** The arms with their statistics, in definition order. */
    public List<Arm> arms() {
        List<String> names = definition.getArms();
        List<Arm> arms = new ArrayList<>(names.size());
        for (int i = 0; i < names.size(); i++) {
            arms.add(new Arm(names.get(i), stats.get(i)));
        }
        return arms;
    }

    /** The engine metric of the definition in force. */
    public Metric metric() {
        return Definitions.metric(definition);
    }

    @Override
    public double[] lastWeights() {
        return lastWeights == null ? null : lastWeights.clone();
    }

    @Override
    public long[] pending() {
        return pending == null ? null : pending.clone();
    }

    @Override
    public long[] armSince() {
        return armSince.clone();
    }

    /** {@link #withDelta(int, ArmStats, long, long)} with no change of pending units. */
    public ExperimentState withDelta(int index, ArmStats delta, long now) {
        return withDelta(index, delta, 0, now);
    }

    /**
     * This state with {@code delta} merged into arm {@code index}'s statistics and {@code pendingDelta} added
     * to its pending units (never below 0), started at {@code now} if it had not started; marked dirty when
     * the statistics changed (a change of pending units alone brings no new information to evaluate).
     */
    public ExperimentState withDelta(int index, ArmStats delta, long pendingDelta, long now) {
        List<ArmStats> merged = new ArrayList<>(stats);
        merged.set(index, ArmStats.merge(stats.get(index), delta));
        long[] waiting = pending == null ? new long[stats.size()] : pending.clone();
        waiting[index] = Math.max(0, waiting[index] + pendingDelta);
        boolean counted = delta.trials() > 0 || delta instanceof BernoulliStats b && b.successes() > 0;
        return new ExperimentState(definition, merged, stop, decisionSequence, allocationSequence, lastHash,
                lastWeights, startedAt < 0 ? now : startedAt, lastComputedAt, lastPublishedAt, dirty || counted, due,
                waiting, armSince, guardrails);
    }

    /**
     * This state under a new definition version. Only the configuration changes, except: arms that are new
     * start with empty statistics, no pending units and count only units first exposed under {@code next}
     * (a re-added arm starts clean), removed arms are dropped, and the last weights are forgotten when the
     * arm list changed; a change of metric kind empties every arm. A running experiment is due for
     * evaluation; a stopped one keeps its stop.
     */
    public ExperimentState withDefinition(ExperimentDefinition next) {
        boolean sameKind = Definitions.metric(next) == metric();
        List<String> before = definition.getArms();
        int arms = next.getArms().size();
        List<ArmStats> keptStats = new ArrayList<>(arms);
        long[] waiting = new long[arms];
        long[] since = new long[arms];
        int[] kept = new int[arms];
        for (int i = 0; i < arms; i++) {
            int old = before.indexOf(next.getArms().get(i));
            boolean keep = sameKind && old >= 0;
            kept[i] = keep ? old : -1;
            keptStats.add(keep ? stats.get(old) : empty(next, 1).get(0));
            waiting[i] = keep && pending != null ? pending[old] : 0;
            since[i] = keep ? armSince[old] : next.getVersion();
        }
        boolean sameArms = before.equals(next.getArms()) && sameKind;
        return new ExperimentState(next, keptStats, stop, decisionSequence, allocationSequence, lastHash,
                sameArms ? lastWeights : null, startedAt, lastComputedAt, lastPublishedAt, dirty, !stopped(), waiting,
                since, guardrails.remapped(next, kept));
    }

    /**
     * This state with {@code units} more counted units of arm {@code index} for every guardrail, of which
     * {@code signalUnits.get(s)} had signal s; marked dirty when units were counted.
     */
    public ExperimentState withGuardrailUnits(int index, long units, java.util.Map<String, Long> signalUnits) {
        return withGuardrailUnits(index, units, signalUnits, java.util.Map.of());
    }

    /**
     * This state with {@code units} more counted units of arm {@code index} for every guardrail, of which
     * {@code signalUnits.get(s)} had signal s, and whose capped sums of signal s's values, each over its
     * guardrails' valueCap, add up to {@code signalTotals.get(s)}; marked dirty when units were counted.
     */
    public ExperimentState withGuardrailUnits(int index, long units, java.util.Map<String, Long> signalUnits,
                                              java.util.Map<String, Double> signalTotals) {
        if (units == 0 || guardrails.guardrails().isEmpty()) {
            return this;
        }
        return new ExperimentState(definition, stats, stop, decisionSequence, allocationSequence, lastHash,
                lastWeights, startedAt, lastComputedAt, lastPublishedAt, true, due, pending, armSince,
                guardrails.plus(index, units, signalUnits, signalTotals, definition));
    }

    /** This state after an evaluation published decision {@code sequence} with {@code hash}. */
    ExperimentState evaluated(long now, String hash, double[] weights, Stop newStop) {
        return new ExperimentState(definition, stats, newStop, decisionSequence + 1, allocationSequence + 1, hash,
                weights, startedAt, now, now, false, false, pending, armSince, guardrails);
    }

    /** This state after a heartbeat of a stopped experiment (a control record only). */
    ExperimentState republished(long now) {
        return new ExperimentState(definition, stats, stop, decisionSequence, allocationSequence + 1, lastHash,
                lastWeights, startedAt, lastComputedAt, now, dirty, false, pending, armSince, guardrails);
    }

    /** This state after an evaluation failed at {@code now}: not retried before new data or a heartbeat. */
    public ExperimentState failed(long now) {
        return new ExperimentState(definition, stats, stop, decisionSequence, allocationSequence, lastHash,
                lastWeights, startedAt, now, now, false, false, pending, armSince, guardrails);
    }

    private static List<ArmStats> empty(ExperimentDefinition definition, int count) {
        ArmStats zero = Definitions.metric(definition) == Metric.BERNOULLI ? BernoulliStats.EMPTY : ValueStats.EMPTY;
        return new ArrayList<>(Collections.nCopies(count, zero));
    }

    @Override
    public boolean equals(Object o) {
        return o instanceof ExperimentState s && definition.equals(s.definition) && stats.equals(s.stats)
                && Objects.equals(stop, s.stop) && decisionSequence == s.decisionSequence
                && allocationSequence == s.allocationSequence && lastHash.equals(s.lastHash)
                && Arrays.equals(lastWeights, s.lastWeights) && startedAt == s.startedAt
                && lastComputedAt == s.lastComputedAt && lastPublishedAt == s.lastPublishedAt && dirty == s.dirty
                && due == s.due && Arrays.equals(pending, s.pending) && Arrays.equals(armSince, s.armSince)
                && guardrails.equals(s.guardrails);
    }

    @Override
    public int hashCode() {
        return Objects.hash(definition, stats, stop, decisionSequence, allocationSequence, lastHash,
                Arrays.hashCode(lastWeights), startedAt, lastComputedAt, lastPublishedAt, dirty, due,
                Arrays.hashCode(pending), Arrays.hashCode(armSince), guardrails);
    }

    @Override
    public String toString() {
        return "ExperimentState[" + experimentId() + " v" + definition.getVersion() + ", stats=" + stats
                + ", stop=" + stop + ", decision=" + decisionSequence + ", allocation=" + allocationSequence
                + ", lastWeights=" + Arrays.toString(lastWeights) + ", startedAt=" + startedAt
                + ", lastComputedAt=" + lastComputedAt + ", lastPublishedAt=" + lastPublishedAt + ", dirty=" + dirty
                + ", due=" + due + ", pending=" + Arrays.toString(pending) + ", armSince="
                + Arrays.toString(armSince) + ", guardrails=" + guardrails + "]";
    }

    /**
     * The STOP that ended learning, and what the control records carry from then on.
     *
     * @param winner            the arm the STOP named
     * @param definitionVersion the definition version in force at the stop
     * @param arms              the arms at the stop, in order
     * @param weights           the after-stop weights, in the same order
     */
    public record Stop(String winner, long definitionVersion, List<String> arms, double[] weights) {

        /** Copies the lists and checks their lengths agree. */
        public Stop {
            Objects.requireNonNull(winner, "winner");
            arms = List.copyOf(arms);
            weights = weights.clone();
            if (weights.length != arms.size()) {
                throw new IllegalArgumentException(weights.length + " weights for " + arms.size() + " arms");
            }
        }

        @Override
        public double[] weights() {
            return weights.clone();
        }

        @Override
        public boolean equals(Object o) {
            return o instanceof Stop s && winner.equals(s.winner) && definitionVersion == s.definitionVersion
                    && arms.equals(s.arms) && Arrays.equals(weights, s.weights);
        }

        @Override
        public int hashCode() {
            return Objects.hash(winner, definitionVersion, arms, Arrays.hashCode(weights));
        }

        @Override
        public String toString() {
            return "Stop[winner=" + winner + ", v" + definitionVersion + ", arms=" + arms + ", weights="
                    + Arrays.toString(weights) + "]";
        }
    }
}
