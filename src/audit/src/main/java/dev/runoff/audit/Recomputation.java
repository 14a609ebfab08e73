package dev.runoff.audit;

import dev.runoff.engine.EngineConfig;
import dev.runoff.engine.EngineVersion;
import dev.runoff.engine.stats.ArmStats;
import dev.runoff.engine.stats.BernoulliStats;
import dev.runoff.engine.stats.ValueStats;
import dev.runoff.records.avro.ArmState;
import dev.runoff.records.avro.DecisionRecord;
import dev.runoff.records.avro.MetricKind;
import dev.runoff.decision.Evaluator;
import dev.runoff.decision.ExperimentState;
import dev.runoff.decision.GuardrailCounts;
import java.util.ArrayList;
import java.util.List;
import java.util.Optional;
import java.util.Set;

/**
 * Recomputes each decision record with the job's own evaluation ({@link Evaluator}: the same mapping from the
 * embedded definition to the engine and stopping configurations, the same seed derivation, the same record
 * layout) from the record's statistics, definition and sequence, and the weights of the record before it,
 * with the engine version the record names ({@link EngineVersion}); the result must equal the record in every
 * field, bit for bit. A record naming a version this verifier does not support is a finding that names the
 * supported ones.
 *
 * <p>The minimum-duration guard measures from the time the experiment's first statistics were folded. A
 * record holds it as {@code startedAt}, and is recomputed from it: the guard is checked exactly. Records
 * written before that field existed ({@code startedAt} null) are first recomputed as if the guard were met;
 * when that differs and the definition has a minimum duration, as if it were not. The second reading is
 * accepted only if no earlier record shows statistics from long enough before (the job's start time is at or
 * before the first record with any trials), else the record's reason contradicts the guard. A recorded
 * {@code startedAt} after an earlier record with trials is likewise a stopping failure.
 */
public final class Recomputation {

    /** Fields that belong to the stopping decision; a difference there is a {@link Check#STOPPING} finding. */
    private static final Set<String> STOPPING_FIELDS = Set.of("decision", "winner", "reason", "statistic",
            "threshold");
    /** Fields checked by the chain and the signature check, not here. */
    private static final List<String> CHAIN_FIELDS = List.of("previousHash", "hash", "keyId", "signature");
    /** Fields left out when recomputing a record without {@code startedAt}: the chain's, and the start assumed. */
    private static final List<String> WITHOUT_START = List.of("previousHash", "hash", "keyId", "signature",
            "startedAt");

    /** Outcome over one experiment: findings, the number reproduced, notes. */
    record Result(List<Finding> findings, int reproduced, List<String> notes) {
    }

    /** Recomputes every valid record of one experiment's entries, in the order read. */
    Result check(List<Entry> entries) {
        List<Finding> findings = new ArrayList<>();
        List<String> notes = new ArrayList<>();
        int reproduced = 0;
        Long firstTrialsAt = null;
        for (int i = 0; i < entries.size(); i++) {
            Entry entry = entries.get(i);
            if (!entry.isValid()) {
                continue;
            }
            DecisionRecord record = entry.record();
            Previous previous = previousWeights(entries, i);
            if (!previous.known()) {
                notes.add(entry.describe() + ": not recomputed: the record before it is missing or invalid, and"
                        + " its weights are an input");
            } else {
                Optional<Finding> finding = recompute(i, entry, previous.weights(), firstTrialsAt);
                finding.ifPresent(findings::add);
                reproduced += finding.isEmpty() ? 1 : 0;
            }
            if (firstTrialsAt == null && record.getArms().stream().anyMatch(a -> a.getTrials() > 0)) {
                firstTrialsAt = record.getStreamTime();
            }
        }
        return new Result(findings, reproduced, notes);
    }

    /**
     * The weights published before record {@code i}: empty for the first record of a chain or after a change
     * of arms or metric kind (the job forgets them then), or unknown when the record before is not at hand.
     */
    private static Previous previousWeights(List<Entry> entries, int i) {
        DecisionRecord record = entries.get(i).record();
        if (record.getSequence() == 1) {
            return Previous.NONE;
        }
        Entry before = i > 0 ? entries.get(i - 1) : null;
        if (before == null || !before.isValid() || before.record().getSequence() != record.getSequence() - 1) {
            return Previous.UNKNOWN;
        }
        DecisionRecord p = before.record();
        boolean sameArms = names(p).equals(names(record)) && kind(p) == kind(record);
        return sameArms ? new Previous(true, p.getArms().stream().mapToDouble(ArmState::getWeight).toArray())
                : Previous.NONE;
    }

    private Optional<Finding> recompute(int index, Entry entry, double[] previous, Long firstTrialsAt) {
        DecisionRecord record = entry.record();
        Optional<EngineVersion> found = EngineVersion.find(record.getEngineVersion());
        if (found.isEmpty()) {
            return Optional.of(Finding.of(index, entry, Check.RECOMPUTATION, "engineVersion", "the record was"
                    + " computed by engine version " + record.getEngineVersion() + "; this verifier reproduces"
                    + " engine versions " + EngineVersion.supported() + " and cannot reproduce it bit for bit"));
        }
        EngineVersion version = found.get();
        try {
            if (record.getStartedAt() != null) {
                return recomputeFromStart(index, entry, previous, firstTrialsAt, version);
            }
            Optional<RecordDiff.Difference> met = RecordDiff.first(record, evaluate(record, previous, 0, version),
                    WITHOUT_START);
            if (met.isEmpty()) {
                return Optional.empty();
            }
            long minDuration = record.getDefinition().getStopping().getMinDurationMs();
            if (minDuration > 0 && RecordDiff.first(record, evaluate(record, previous, record.getStreamTime(),
                    version), WITHOUT_START).isEmpty()) {
                return minDurationContradiction(index, entry, minDuration, firstTrialsAt);
            }
            return Optional.of(finding(index, entry, met.get()));
        } catch (RuntimeException e) {
            return Optional.of(Finding.of(index, entry, Check.RECOMPUTATION, "record", "engine version "
                    + version.label() + " rejected the record's input: " + e.getMessage()));
        }
    }

    /** The exact check of a record holding {@code startedAt}: recomputed with the Timing it states. */
    private static Optional<Finding> recomputeFromStart(int index, Entry entry, double[] previous,
                                                        Long firstTrialsAt, EngineVersion version) {
        Optional<Finding> late = startAfterTrials(index, entry, firstTrialsAt);
        if (late.isPresent()) {
            return late;
        }
        DecisionRecord record = entry.record();
        return RecordDiff.first(record, evaluate(record, previous, record.getStartedAt(), version), CHAIN_FIELDS)
                .map(d -> finding(index, entry, d));
    }

    /**
     * A recorded start later than an earlier record with trials: the job's start is when the first statistics
     * were folded, so at or before that record's stream time.
     */
    private static Optional<Finding> startAfterTrials(int index, Entry entry, Long firstTrialsAt) {
        long startedAt = entry.record().getStartedAt();
        if (firstTrialsAt == null || startedAt <= firstTrialsAt) {
            return Optional.empty();
        }
        return Optional.of(Finding.of(index, entry, Check.STOPPING, "startedAt", "is " + startedAt + ", after "
                + firstTrialsAt + ", the stream time of an earlier record that already had trials"));
    }

    /** A record whose reading needs the guard unmet, although statistics have existed for long enough. */
    private static Optional<Finding> minDurationContradiction(int index, Entry entry, long minDuration,
                                                              Long firstTrialsAt) {
        long now = entry.record().getStreamTime();
        if (firstTrialsAt == null || now - firstTrialsAt < minDuration) {
            return Optional.empty();
        }
        return Optional.of(Finding.of(index, entry, Check.STOPPING, "reason", "is " + entry.record().getReason()
                + " (minimum duration " + minDuration + " ms not reached), but the experiment has had trials for at"
                + " least " + (now - firstTrialsAt) + " ms"));
    }

    private static Finding finding(int index, Entry entry, RecordDiff.Difference d) {
        Check check = STOPPING_FIELDS.contains(d.topLevel()) ? Check.STOPPING : Check.RECOMPUTATION;
        Long startedAt = entry.record().getStartedAt();
        String timing = startedAt == null ? "" : " (timing from the record's startedAt " + startedAt + ")";
        return Finding.of(index, entry, check, d.field(), "recorded " + d.recorded() + ", engine version "
                + entry.record().getEngineVersion() + " (the record's) recomputes " + d.recomputed() + timing);
    }

    /**
     * The job's evaluation of the record's input by engine {@code version}, with the experiment's statistics
     * dating from {@code startedAt}; the result holds {@code startedAt} as the job would have written it.
     */
    private static DecisionRecord evaluate(DecisionRecord record, double[] previous, long startedAt,
                                           EngineVersion version) {
        List<ArmStats> stats = record.getArms().stream().map(a -> stats(a, kind(record))).toList();
        ExperimentState state = new ExperimentState(record.getDefinition(), stats, null, record.getSequence() - 1, 0,
                record.getPreviousHash(), previous, startedAt, -1, -1, false, false, pending(record), null,
                GuardrailCounts.of(record));
        int draws = record.getDraws() > 0 ? record.getDraws() : EngineConfig.DEFAULT_DRAWS;
        return new Evaluator(draws, version).evaluate(state, record.getStreamTime()).decision();
    }

    /**
     * The pending units the record reports (an input the decision did not use, carried over so that the
     * recomputed record states them too), or {@code null} when it reports none.
     */
    private static long[] pending(DecisionRecord record) {
        if (record.getArms().stream().anyMatch(a -> a.getPending() == null)) {
            return null;
        }
        return record.getArms().stream().mapToLong(ArmState::getPending).toArray();
    }

    /** The sufficient statistics of one arm as the record states them. */
    static ArmStats stats(ArmState arm, MetricKind kind) {
        return kind == MetricKind.BERNOULLI ? new BernoulliStats(arm.getTrials(), arm.getSuccesses())
                : new ValueStats(arm.getTrials(), arm.getMean(), arm.getM2());
    }

    private static MetricKind kind(DecisionRecord record) {
        return record.getDefinition().getMetric().getKind();
    }

    /** The weights published before a record, if {@code known} ({@code null} weights: none were). */
    private record Previous(boolean known, double[] weights) {
        static final Previous NONE = new Previous(true, null);
        static final Previous UNKNOWN = new Previous(false, null);
    }

    private static List<String> names(DecisionRecord record) {
        return record.getArms().stream().map(ArmState::getArm).toList();
    }
}
