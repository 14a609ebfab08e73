package dev.runoff.audit;

import dev.runoff.records.Problem;
import dev.runoff.records.SignatureVerifier;
import dev.runoff.records.avro.DecisionRecord;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Locale;
import java.util.Map;
import java.util.Objects;
import java.util.Optional;

/**
 * Runs every check of {@code audit verify} on the records read, experiment by experiment, in the order read:
 * the codec's rules (including that each hash matches its content), the chain links, the sequence numbers,
 * the signatures (when public keys are given), the recomputation and the stopping decision, and the
 * sample-ratio test of each period.
 */
public final class Verifier {

    private final SampleRatio sampleRatio;
    private final Recomputation recomputation = new Recomputation();
    private final SignatureVerifier keys;
    private final Map<String, String> lastHashes;
    private final CrossCheck crossCheck;

    /**
     * A verifier whose sample-ratio test runs at significance level {@code alpha}, checking no signature
     * (authorship is not checked).
     */
    public Verifier(double alpha) {
        this(alpha, null);
    }

    /**
     * A verifier whose sample-ratio test runs at significance level {@code alpha} and that checks every
     * record's signature against {@code keys} (null: authorship not checked).
     */
    public Verifier(double alpha, SignatureVerifier keys) {
        this(alpha, keys, Map.of());
    }

    /**
     * As {@link #Verifier(double, SignatureVerifier)}, also checking that each experiment in {@code lastHashes}
     * (experiment id to the hash of its latest record, kept apart from the topic) still has a record with that
     * hash: the chain alone cannot show that records were cut off its end.
     */
    public Verifier(double alpha, SignatureVerifier keys, Map<String, String> lastHashes) {
        this(new SampleRatio(alpha), keys, Map.copyOf(lastHashes), null);
    }

    private Verifier(SampleRatio sampleRatio, SignatureVerifier keys, Map<String, String> lastHashes,
                     CrossCheck crossCheck) {
        this.sampleRatio = sampleRatio;
        this.keys = keys;
        this.lastHashes = lastHashes;
        this.crossCheck = crossCheck;
    }

    /**
     * This verifier also cross-checking every Monte Carlo estimate against exact integration: an arm whose
     * recorded alpha lies more than {@code sigmas} recorded standard errors from the exact value is a
     * {@link Check#CROSS_CHECK} finding.
     *
     * @throws IllegalArgumentException unless {@code sigmas} is finite and {@code > 0}
     */
    public Verifier withCrossCheck(double sigmas) {
        return new Verifier(sampleRatio, keys, lastHashes, new CrossCheck(sigmas));
    }

    /** The trusted public keys, or empty when authorship is not checked. */
    public Optional<SignatureVerifier> keys() {
        return Optional.ofNullable(keys);
    }

    /** The audits of every experiment in {@code entries}, in the order each experiment first appears. */
    public List<ExperimentAudit> verify(List<Entry> entries) {
        Map<String, List<Entry>> groups = new LinkedHashMap<>();
        for (Entry entry : entries) {
            groups.computeIfAbsent(Objects.requireNonNullElse(entry.experimentId(), ""), k -> new ArrayList<>())
                    .add(entry);
        }
        List<ExperimentAudit> audits = new ArrayList<>(groups.size());
        groups.forEach((id, list) -> audits.add(verifyExperiment(id.isEmpty() ? null : id, list)));
        return audits;
    }

    /** The audit of one experiment's records, given in the order read. */
    public ExperimentAudit verifyExperiment(String experimentId, List<Entry> entries) {
        List<Finding> findings = new ArrayList<>(recordProblems(entries));
        findings.addAll(ChainCheck.check(entries));
        if (keys != null) {
            findings.addAll(SignatureCheck.check(entries, keys));
        }
        String anchor = experimentId == null ? null : lastHashes.get(experimentId);
        if (anchor != null && !entries.isEmpty() && entries.stream().noneMatch(e -> anchor.equals(e.hash()))) {
            int last = entries.size() - 1;
            findings.add(Finding.of(last, entries.get(last), Check.CHAIN, "hash", "no record has the hash " + anchor
                    + " kept as the latest: records were cut off the end (the last one read has hash "
                    + entries.get(last).hash() + ")"));
        }
        findings.addAll(SequenceCheck.check(entries));
        Recomputation.Result recomputed = recomputation.check(entries);
        findings.addAll(recomputed.findings());
        if (crossCheck != null) {
            findings.addAll(crossCheck.check(entries));
        }
        List<SampleRatio.Period> periods = new ArrayList<>();
        List<DecisionRecord> history = new ArrayList<>();
        for (int i = 1; i < entries.size(); i++) {
            if (entries.get(i - 1).isValid()) {
                history.add(entries.get(i - 1).record());
            }
            SampleRatio.Period period = period(history, entries.get(i - 1), entries.get(i));
            periods.add(period);
        }
        List<SampleRatio.Period> judged = sampleRatio.acrossPeriods(periods);
        for (int i = 1; i < entries.size(); i++) {
            SampleRatio.Period period = judged.get(i - 1);
            if (period != null && period.outcome() == SampleRatio.Outcome.FLAGGED) {
                findings.add(Finding.of(i, entries.get(i), Check.SAMPLE_RATIO, "arms.trials",
                        describe(entries.get(i).record(), period)));
            }
        }
        judged.removeIf(java.util.Objects::isNull);
        findings.sort(Finding.ORDER);
        return new ExperimentAudit(experimentId, entries.size(), recomputed.reproduced(), findings, judged,
                recomputed.notes());
    }

    /** The codec's problems; one about the hash is a chain failure, any other a record failure. */
    private static List<Finding> recordProblems(List<Entry> entries) {
        List<Finding> findings = new ArrayList<>();
        for (int i = 0; i < entries.size(); i++) {
            for (Problem problem : entries.get(i).problems()) {
                Check check = problem.field().equals("hash") ? Check.CHAIN : Check.RECORD;
                findings.add(Finding.of(i, entries.get(i), check, problem.field(), problem.message()));
            }
        }
        return findings;
    }

    /**
     * The period between two records read one after the other, or null when either is invalid; the valid
     * records read before {@code after} ({@code history}, the last being {@code before}) lend the weight
     * vectors still valid in the period.
     */
    private SampleRatio.Period period(List<DecisionRecord> history, Entry before, Entry after) {
        if (!before.isValid() || !after.isValid()) {
            return null;
        }
        DecisionRecord a = before.record();
        DecisionRecord b = after.record();
        if (b.getSequence() != a.getSequence() + 1) {
            return new SampleRatio.Period(a.getSequence(), b.getSequence(), null, null, null, null, null, null,
                    null, null, null, null, null, SampleRatio.Outcome.SKIPPED, "the records are not consecutive");
        }
        return sampleRatio.test(history, b);
    }

    private String describe(DecisionRecord after, SampleRatio.Period period) {
        StringBuilder text = new StringBuilder(period.note()).append(": exposures since sequence ")
                .append(period.fromSequence()).append(' ');
        List<String> arms = after.getArms().stream().map(a -> a.getArm()).toList();
        text.append(pairs(arms, Arrays.stream(period.observed()).mapToObj(Long::toString).toList()))
                .append(" against weights ")
                .append(pairs(arms, Arrays.stream(period.weights()).mapToObj(Verifier::number).toList()));
        if (period.previousWeights() != null) {
            text.append(" and previous weights ")
                    .append(pairs(arms, Arrays.stream(period.previousWeights()).mapToObj(Verifier::number).toList()));
        }
        if (period.candidates() != null && period.candidates() > 1) {
            text.append(" among ").append(period.candidates()).append(" weight vectors valid in the period");
        }
        if (period.pValue() != null) {
            text.append(String.format(Locale.ROOT, "; chi-square %.4g (certified minimum >= %.4g), p = %.3g < %s",
                    period.statistic(), Math.max(0.0, period.statistic() - period.gap()), period.pValue(),
                    period.level() == null ? "alpha " + number(sampleRatio.alpha())
                            : "Holm's level " + number(period.level()) + " (alpha " + number(sampleRatio.alpha())
                            + " over the experiment's tested periods)"));
        }
        return text.toString();
    }

    private static String pairs(List<String> arms, List<String> values) {
        StringBuilder out = new StringBuilder("{");
        for (int i = 0; i < arms.size(); i++) {
            out.append(i == 0 ? "" : ", ").append(arms.get(i)).append('=').append(values.get(i));
        }
        return out.append('}').toString();
    }

    private static String number(double value) {
        return String.format(Locale.ROOT, "%.4g", value);
    }
}
