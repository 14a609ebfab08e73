package dev.runoff.audit;

import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.Set;
import java.util.TreeSet;

/** The result of {@code audit verify} as readable text or as JSON. */
public final class VerifyReport {

    /** Findings listed per experiment in the text report before the rest is summarised. */
    static final int TEXT_FINDINGS = 10;
    /** Skipped sample-ratio periods listed per experiment in the text report. */
    static final int TEXT_SKIPPED = 5;

    private VerifyReport() {
    }

    /** Whether every experiment passed (and there was at least one). */
    public static boolean passed(List<ExperimentAudit> audits) {
        return !audits.isEmpty() && audits.stream().allMatch(ExperimentAudit::passed);
    }

    /** A paragraph per experiment: verdict, counts, first failure, further findings, sample-ratio summary. */
    public static String text(List<ExperimentAudit> audits, double alpha, Set<String> keyIds) {
        return authorship(keyIds) + "\n" + text(audits, alpha);
    }

    /**
     * One line on authorship: the key ids signatures were checked against, or that authorship was not
     * checked ({@code keyIds} null).
     */
    public static String authorship(Set<String> keyIds) {
        return keyIds == null
                ? "Authorship: NOT checked (no --public-key given): the chain shows the records are complete, in "
                + "order and unedited since sealed, not who wrote them; anyone able to write to the topic can "
                + "reseal a forged chain"
                : "Authorship: every signature checked against key(s) " + new TreeSet<>(keyIds);
    }

    /** The text report without the authorship line. */
    public static String text(List<ExperimentAudit> audits, double alpha) {
        StringBuilder out = new StringBuilder();
        if (audits.isEmpty()) {
            return "FAILED: no decision records found\n";
        }
        for (ExperimentAudit audit : audits) {
            out.append("Experiment ").append(name(audit)).append(": ").append(audit.passed() ? "VERIFIED" : "FAILED")
                    .append('\n');
            out.append("  records checked: ").append(audit.records()).append(", reproduced bit for bit: ")
                    .append(audit.reproduced()).append('\n');
            audit.firstFailure().ifPresent(f -> out.append("  first failure: ").append(f).append('\n'));
            List<Finding> findings = audit.findings();
            for (int i = 1; i < Math.min(findings.size(), TEXT_FINDINGS); i++) {
                out.append("  also: ").append(findings.get(i)).append('\n');
            }
            if (findings.size() > TEXT_FINDINGS) {
                out.append("  ... and ").append(findings.size() - TEXT_FINDINGS).append(" more findings (see --json)\n");
            }
            sampleRatio(out, audit, alpha);
            audit.notes().forEach(n -> out.append("  note: ").append(n).append('\n'));
        }
        long failed = audits.stream().filter(a -> !a.passed()).count();
        out.append(failed == 0 ? "All " + audits.size() + " experiment(s) verified.\n"
                : failed + " of " + audits.size() + " experiment(s) FAILED.\n");
        return out.toString();
    }

    private static void sampleRatio(StringBuilder out, ExperimentAudit audit, double alpha) {
        out.append("  sample ratio (chi-square, alpha ").append(alpha).append(" per experiment, Holm across periods): ")
                .append(audit.count(SampleRatio.Outcome.PASSED) + audit.count(SampleRatio.Outcome.FLAGGED))
                .append(" periods tested, ").append(audit.count(SampleRatio.Outcome.FLAGGED)).append(" flagged, ")
                .append(audit.count(SampleRatio.Outcome.SKIPPED)).append(" skipped")
                .append(candidates(audit)).append('\n');
        List<SampleRatio.Period> skipped = audit.periods().stream()
                .filter(p -> p.outcome() == SampleRatio.Outcome.SKIPPED).toList();
        for (int i = 0; i < Math.min(skipped.size(), TEXT_SKIPPED); i++) {
            SampleRatio.Period p = skipped.get(i);
            out.append("    skipped ").append(p.fromSequence()).append(" -> ").append(p.toSequence()).append(": ")
                    .append(p.note()).append('\n');
        }
        if (skipped.size() > TEXT_SKIPPED) {
            out.append("    ... and ").append(skipped.size() - TEXT_SKIPPED).append(" more skipped periods\n");
        }
    }

    /** {@code "; up to K weight vectors per period"} when some tested period had more than one candidate. */
    private static String candidates(ExperimentAudit audit) {
        int most = audit.periods().stream().filter(p -> p.outcome() != SampleRatio.Outcome.SKIPPED)
                .mapToInt(p -> p.candidates() == null ? 0 : p.candidates()).max().orElse(0);
        return most > 1 ? "; up to " + most + " valid weight vectors per period" : "";
    }

    /** {@code {"verified": bool, "alpha": a, "experiments": [...]}} with every finding and period. */
    public static String json(List<ExperimentAudit> audits, double alpha) {
        return json(audits, alpha, null);
    }

    /**
     * As {@link #json(List, double)} with {@code "authorshipChecked"} and {@code "publicKeys"} (the key ids,
     * null when no key was given).
     */
    public static String json(List<ExperimentAudit> audits, double alpha, Set<String> keyIds) {
        Map<String, Object> root = new LinkedHashMap<>();
        root.put("verified", passed(audits));
        root.put("alpha", alpha);
        root.put("authorshipChecked", keyIds != null);
        root.put("publicKeys", keyIds == null ? null : List.copyOf(new TreeSet<>(keyIds)));
        List<Map<String, Object>> experiments = new ArrayList<>();
        for (ExperimentAudit audit : audits) {
            Map<String, Object> map = new LinkedHashMap<>();
            map.put("experimentId", audit.experimentId());
            map.put("verified", audit.passed());
            map.put("records", audit.records());
            map.put("reproduced", audit.reproduced());
            map.put("firstFailure", audit.firstFailure().map(Finding::toMap).orElse(null));
            map.put("findings", audit.findings().stream().map(Finding::toMap).toList());
            map.put("sampleRatio", audit.periods().stream().map(VerifyReport::period).toList());
            map.put("notes", audit.notes());
            experiments.add(map);
        }
        root.put("experiments", experiments);
        return TimelineWriter.write(root);
    }

    private static Map<String, Object> period(SampleRatio.Period p) {
        Map<String, Object> map = new LinkedHashMap<>();
        map.put("fromSequence", p.fromSequence());
        map.put("toSequence", p.toSequence());
        map.put("outcome", p.outcome().name());
        map.put("observed", p.observed());
        map.put("weights", p.weights());
        map.put("previousWeights", p.previousWeights());
        map.put("lagShare", p.lagShare());
        map.put("candidates", p.candidates());
        map.put("mixture", p.mixture() == null ? null : p.mixture().stream().map(VerifyReport::component).toList());
        map.put("fittedShares", p.fittedShares());
        map.put("chiSquare", p.statistic());
        map.put("dualityGap", p.gap());
        map.put("pValue", p.pValue());
        map.put("level", p.level());
        map.put("note", p.note());
        return map;
    }

    private static Map<String, Object> component(SampleRatio.Component c) {
        Map<String, Object> map = new LinkedHashMap<>();
        map.put("sequence", c.sequence());
        map.put("share", c.share());
        return map;
    }

    private static String name(ExperimentAudit audit) {
        return audit.experimentId() == null ? "(records whose experiment could not be read)" : audit.experimentId();
    }
}
