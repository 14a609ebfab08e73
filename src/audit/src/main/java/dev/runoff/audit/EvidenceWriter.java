package dev.runoff.audit;

import dev.runoff.decision.Evidence;
import dev.runoff.records.CanonicalJson;
import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Locale;
import java.util.Map;

/**
 * The evidence view ({@link EvidenceView}) in the report's formats: a text section (the last decision's
 * evidence and rates, the predicted rates, and one line on balance), three CSV columns per arm, and JSON
 * objects (field names documented in the audit documentation).
 */
final class EvidenceWriter {

    private EvidenceWriter() {
    }

    /** The text section printed after the decision table. */
    static String text(EvidenceView view) {
        Evidence.Row last = view.last();
        StringBuilder out = new StringBuilder();
        out.append(String.format(Locale.ROOT, "Evidence against the losing arms at decision %d (%,d trials; leader %s):"
                + " -ln P(best), and its growth per 1,000 trials (least-squares slope over the decisions in the last"
                + " %s of the trials)%n", view.sequences().get(view.sequences().size() - 1), last.totalTrials(),
                last.leader(), Evidence.windowShare()));
        int width = last.points().keySet().stream().mapToInt(String::length).max().orElse(0);
        last.points().forEach((arm, p) -> out.append(String.format(Locale.ROOT, "  %-" + width + "s  evidence %s%s (%s)"
                + "  rate %s%n", arm, p.isBound() ? ">= " : "", Evidence.number(p.evidence()),
                p.source().description(),
                Double.isNaN(p.ratePerThousand()) ? "n/a" : Evidence.number(p.ratePerThousand()))));
        if (view.reference() != null) {
            out.append(referenceLine(view)).append('\n');
        }
        return out.append(Evidence.balanceLine(view.balance(), last)).append('\n').toString();
    }

    private static String referenceLine(EvidenceView view) {
        Evidence.Reference ref = view.reference();
        List<String> rates = new ArrayList<>();
        for (double r : view.estimatedRates()) {
            rates.add(String.format(Locale.ROOT, "%.4f", r));
        }
        String gamma = Double.isNaN(ref.betaOptimal()) ? "Gamma*_beta n/a (beta " + Evidence.number(ref.beta()) + ")"
                : "Gamma*_beta " + Evidence.number(ref.betaOptimal()) + " at beta " + Evidence.number(ref.beta());
        return "Predicted rates per 1,000 trials at the estimated rates (" + String.join(", ", rates) + "): " + gamma
                + "; uniform split " + Evidence.number(ref.uniform());
    }

    /** CSV header cells: evidence_, evidenceSource_ and evidenceRate_ per arm. */
    static List<String> csvHeader(List<String> arms) {
        List<String> header = new ArrayList<>();
        for (String prefix : List.of("evidence_", "evidenceSource_", "evidenceRate_")) {
            arms.forEach(arm -> header.add(prefix + arm));
        }
        return header;
    }

    /** CSV cells of one row; empty for the leader and absent arms, and for a rate not yet defined. */
    static List<String> csvCells(List<String> arms, Evidence.Row row) {
        List<String> cells = new ArrayList<>();
        arms.forEach(arm -> cells.add(cell(row, arm, p -> CanonicalJson.number(p.evidence()))));
        arms.forEach(arm -> cells.add(cell(row, arm, p -> source(p.source()))));
        arms.forEach(arm -> cells.add(cell(row, arm, p -> Double.isNaN(p.ratePerThousand()) ? ""
                : CanonicalJson.number(p.ratePerThousand()))));
        return cells;
    }

    /** The JSON object of one decision's evidence. */
    static Map<String, Object> json(Evidence.Row row) {
        Map<String, Object> arms = new LinkedHashMap<>();
        row.points().forEach((arm, p) -> {
            Map<String, Object> point = new LinkedHashMap<>();
            point.put("minusLnPBest", p.evidence());
            point.put("lowerBound", p.isBound());
            point.put("source", source(p.source()));
            point.put("ratePer1000Trials", finite(p.ratePerThousand()));
            arms.put(arm, point);
        });
        Map<String, Object> map = new LinkedHashMap<>();
        map.put("totalTrials", row.totalTrials());
        map.put("leader", row.leader());
        map.put("losingArms", arms);
        return map;
    }

    /** The JSON object of the verdict and predicted rates at the last decision. */
    static Map<String, Object> jsonSummary(EvidenceView view) {
        Map<String, Object> map = new LinkedHashMap<>();
        map.put("windowShareOfTrials", Evidence.WINDOW_SHARE);
        map.put("balanceTolerance", Evidence.BALANCE_TOLERANCE);
        map.put("verdict", view.balance().verdict().name());
        map.put("slowestArm", view.balance().slowest());
        map.put("fastestArm", view.balance().fastest());
        map.put("rateRatio", finite(view.balance().ratio()));
        map.put("line", Evidence.balanceLine(view.balance(), view.last()));
        Evidence.Reference ref = view.reference();
        if (ref != null) {
            Map<String, Object> reference = new LinkedHashMap<>();
            reference.put("estimatedRates", view.estimatedRates());
            reference.put("beta", ref.beta());
            reference.put("betaOptimalRatePer1000Trials", finite(ref.betaOptimal()));
            reference.put("uniformRatePer1000Trials", ref.uniform());
            map.put("predicted", reference);
        } else {
            map.put("predicted", null);
        }
        return map;
    }

    private static String cell(Evidence.Row row, String arm, java.util.function.Function<Evidence.Point, String> f) {
        Evidence.Point p = row.points().get(arm);
        return p == null ? "" : f.apply(p);
    }

    private static Double finite(double v) {
        return Double.isFinite(v) ? v : null;
    }

    /** The lower-case name of a source, as CSV and JSON spell it. */
    static String source(Evidence.Source source) {
        return source.name().toLowerCase(Locale.ROOT);
    }
}
