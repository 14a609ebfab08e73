package dev.runoff.audit;

import com.fasterxml.jackson.core.JsonProcessingException;
import com.fasterxml.jackson.databind.ObjectMapper;
import com.fasterxml.jackson.databind.SerializationFeature;
import dev.runoff.records.CanonicalJson;
import java.time.Instant;
import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Locale;
import java.util.Map;
import java.util.function.Function;

/**
 * A {@link Timeline} with its {@link EvidenceView} as a text table, as CSV (RFC 4180, full-precision numbers)
 * and as JSON. Times are UTC, ISO-8601. In the text table P(best) and weights are rounded to 4 decimals; CSV
 * and JSON keep every digit (the shortest decimal that reads back as the same double). The evidence view is a
 * section after the text table, three column groups of the CSV and an object per decision in JSON.
 */
public final class TimelineWriter {

    private static final ObjectMapper JSON = new ObjectMapper().enable(SerializationFeature.INDENT_OUTPUT);

    private TimelineWriter() {
    }

    /** An aligned text table with one line per decision, then the evidence section. */
    public static String text(Timeline timeline, EvidenceView evidence) {
        List<String> header = new ArrayList<>(List.of("seq", "time (UTC)"));
        List<List<String>> rows = new ArrayList<>();
        for (String prefix : List.of("trials ", "P(best) ", "weight ")) {
            timeline.arms().forEach(arm -> header.add(prefix + arm));
        }
        header.add("decision");
        for (Timeline.Row row : timeline.rows()) {
            List<String> cells = new ArrayList<>(List.of(Long.toString(row.sequence()), time(row.streamTime())));
            cells.addAll(cells(timeline, row, p -> Long.toString(p.trials())));
            cells.addAll(cells(timeline, row, p -> String.format(Locale.ROOT, "%.4f", p.pBest())));
            cells.addAll(cells(timeline, row, p -> String.format(Locale.ROOT, "%.4f", p.weight())));
            cells.add(decision(row));
            rows.add(cells);
        }
        return "Experiment " + timeline.experimentId() + ": " + timeline.rows().size() + " decisions, arms "
                + String.join(", ", timeline.arms()) + "\n" + table(header, rows) + "\n"
                + EvidenceWriter.text(evidence);
    }

    /**
     * CSV with a header: sequence, time_utc, stream_time_ms, definition_version, then trials_, successes_,
     * pBest_ and weight_ per arm, then evidence_, evidenceSource_ and evidenceRate_ per arm, then decision,
     * winner, reason. Empty cells where an arm is absent (and, for the evidence, for the leader).
     */
    public static String csv(Timeline timeline, EvidenceView evidence) {
        checkAligned(timeline, evidence);
        List<String> header = new ArrayList<>(List.of("sequence", "time_utc", "stream_time_ms", "definition_version"));
        for (String prefix : List.of("trials_", "successes_", "pBest_", "weight_")) {
            timeline.arms().forEach(arm -> header.add(prefix + arm));
        }
        header.addAll(EvidenceWriter.csvHeader(timeline.arms()));
        header.addAll(List.of("decision", "winner", "reason"));
        StringBuilder out = new StringBuilder();
        line(out, header);
        for (int r = 0; r < timeline.rows().size(); r++) {
            Timeline.Row row = timeline.rows().get(r);
            List<String> cells = new ArrayList<>(List.of(Long.toString(row.sequence()), time(row.streamTime()),
                    Long.toString(row.streamTime()), Long.toString(row.definitionVersion())));
            cells.addAll(cells(timeline, row, p -> Long.toString(p.trials())));
            cells.addAll(cells(timeline, row, p -> p.successes() == null ? "" : Long.toString(p.successes())));
            cells.addAll(cells(timeline, row, p -> CanonicalJson.number(p.pBest())));
            cells.addAll(cells(timeline, row, p -> CanonicalJson.number(p.weight())));
            cells.addAll(EvidenceWriter.csvCells(timeline.arms(), evidence.rows().get(r)));
            cells.addAll(List.of(row.decision(), row.winner() == null ? "" : row.winner(), row.reason()));
            line(out, cells);
        }
        return out.toString();
    }

    /**
     * JSON: {@code {"experimentId", "arms", "decisions": [{"sequence", "time", "streamTime", ..., "evidence"}],
     * "evidenceSummary"}}.
     */
    public static String json(Timeline timeline, EvidenceView evidence) {
        checkAligned(timeline, evidence);
        Map<String, Object> root = new LinkedHashMap<>();
        root.put("experimentId", timeline.experimentId());
        root.put("arms", timeline.arms());
        List<Map<String, Object>> decisions = new ArrayList<>();
        for (int r = 0; r < timeline.rows().size(); r++) {
            Timeline.Row row = timeline.rows().get(r);
            Map<String, Object> map = new LinkedHashMap<>();
            map.put("sequence", row.sequence());
            map.put("time", time(row.streamTime()));
            map.put("streamTime", row.streamTime());
            map.put("definitionVersion", row.definitionVersion());
            map.put("arms", row.points());
            map.put("decision", row.decision());
            map.put("winner", row.winner());
            map.put("reason", row.reason());
            map.put("evidence", EvidenceWriter.json(evidence.rows().get(r)));
            decisions.add(map);
        }
        root.put("decisions", decisions);
        root.put("evidenceSummary", EvidenceWriter.jsonSummary(evidence));
        return write(root);
    }

    /** The evidence view must hold one row per decision of the timeline, from the same records. */
    private static void checkAligned(Timeline timeline, EvidenceView evidence) {
        List<Long> sequences = timeline.rows().stream().map(Timeline.Row::sequence).toList();
        if (!sequences.equals(evidence.sequences())) {
            throw new IllegalArgumentException("the evidence view covers decisions " + evidence.sequences()
                    + ", the timeline " + sequences);
        }
    }

    /** Indented JSON of {@code value} (maps, lists, records, numbers, strings). */
    static String write(Object value) {
        try {
            return JSON.writeValueAsString(value) + "\n";
        } catch (JsonProcessingException e) {
            throw new IllegalStateException("cannot write JSON: " + e.getMessage(), e);
        }
    }

    /** ISO-8601 UTC time of {@code millis}. */
    static String time(long millis) {
        return Instant.ofEpochMilli(millis).toString();
    }

    private static String decision(Timeline.Row row) {
        return row.isStop() ? "STOP " + row.winner() + " (" + row.reason() + ")" : row.decision() + " (" + row.reason()
                + ")";
    }

    private static List<String> cells(Timeline timeline, Timeline.Row row, Function<Timeline.Point, String> cell) {
        List<String> cells = new ArrayList<>(timeline.arms().size());
        for (String arm : timeline.arms()) {
            Timeline.Point point = row.points().get(arm);
            cells.add(point == null ? "" : cell.apply(point));
        }
        return cells;
    }

    private static String table(List<String> header, List<List<String>> rows) {
        int[] widths = new int[header.size()];
        for (int c = 0; c < widths.length; c++) {
            widths[c] = header.get(c).length();
            for (List<String> row : rows) {
                widths[c] = Math.max(widths[c], row.get(c).length());
            }
        }
        StringBuilder out = new StringBuilder();
        pad(out, header, widths);
        for (List<String> row : rows) {
            pad(out, row, widths);
        }
        return out.toString();
    }

    private static void pad(StringBuilder out, List<String> cells, int[] widths) {
        StringBuilder line = new StringBuilder();
        for (int c = 0; c < cells.size(); c++) {
            line.append(c == 0 ? "" : "  ").append(String.format("%-" + widths[c] + "s", cells.get(c)));
        }
        out.append(line.toString().stripTrailing()).append('\n');
    }

    private static void line(StringBuilder out, List<String> cells) {
        for (int i = 0; i < cells.size(); i++) {
            out.append(i == 0 ? "" : ",").append(quote(cells.get(i)));
        }
        out.append("\r\n");
    }

    /** RFC 4180: a field holding a comma, quote or line break is quoted, quotes doubled. */
    private static String quote(String cell) {
        boolean needs = cell.indexOf(',') >= 0 || cell.indexOf('"') >= 0 || cell.indexOf('\n') >= 0
                || cell.indexOf('\r') >= 0;
        return needs ? "\"" + cell.replace("\"", "\"\"") + "\"" : cell;
    }
}
