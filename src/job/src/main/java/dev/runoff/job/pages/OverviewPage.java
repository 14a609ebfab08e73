package dev.runoff.job.pages;

import dev.runoff.records.avro.ArmState;
import dev.runoff.records.avro.DecisionRecord;
import java.net.URLEncoder;
import java.nio.charset.StandardCharsets;
import java.util.Comparator;
import java.util.List;
import java.util.Locale;
import java.util.Map;
import java.util.Set;

/**
 * The page at {@code /}: one row per experiment with a decision record, from its latest record. Filtered by
 * status and sorted by a column through plain links and a form ({@code ?status=running&sort=traffic}), so it
 * works without JavaScript.
 */
final class OverviewPage {

    /** Shortest reload interval a page accepts, in seconds. */
    static final int MIN_REFRESH = 2;
    /** Longest reload interval, in seconds. */
    static final int MAX_REFRESH = 3600;

    /** The columns one can sort by, in the order they appear. */
    enum Sort {
        EXPERIMENT, STATUS, TRAFFIC, PBEST, LAST;

        String key() {
            return name().toLowerCase(Locale.ROOT);
        }
    }

    /**
     * What the query asked for.
     *
     * @param status  {@code all}, {@code running} or {@code stopped}
     * @param sort    the column to sort by
     * @param refresh reload interval in seconds, 0 for none
     */
    record Options(String status, Sort sort, int refresh) {

        private static final Set<String> STATUSES = Set.of("all", "running", "stopped");
        private static final Set<String> KEYS = Set.of("status", "sort", "refresh");

        /** The options in {@code query}; an unknown key or value is refused with a message naming it. */
        static Options of(Map<String, String> query) {
            for (String key : query.keySet()) {
                if (!KEYS.contains(key)) {
                    throw new IllegalArgumentException("unknown query parameter '" + key
                            + "': the page takes status, sort and refresh");
                }
            }
            String status = query.getOrDefault("status", "all");
            if (!STATUSES.contains(status)) {
                throw new IllegalArgumentException("status must be all, running or stopped; got '" + status + "'");
            }
            String sort = query.getOrDefault("sort", "experiment");
            Sort by = null;
            for (Sort s : Sort.values()) {
                by = s.key().equals(sort) ? s : by;
            }
            if (by == null) {
                throw new IllegalArgumentException("sort must be experiment, status, traffic, pbest or last; got '"
                        + sort + "'");
            }
            return new Options(status, by, refresh(query));
        }

        /** The reload interval in {@code query} ({@code refresh}, seconds), 0 when absent. */
        static int refresh(Map<String, String> query) {
            String value = query.get("refresh");
            if (value == null) {
                return 0;
            }
            try {
                int seconds = Integer.parseInt(value);
                if (seconds >= MIN_REFRESH && seconds <= MAX_REFRESH) {
                    return seconds;
                }
            } catch (NumberFormatException e) {
                // reported below
            }
            throw new IllegalArgumentException("refresh must be a whole number of seconds in [" + MIN_REFRESH + ", "
                    + MAX_REFRESH + "]; got '" + value + "'");
        }
    }

    private OverviewPage() {
    }

    static String render(DecisionHistory history, String topic, Options options) {
        List<DecisionRecord> rows = history.latest().stream().filter(r -> shown(r, options.status()))
                .sorted(order(options.sort())).toList();
        StringBuilder b = new StringBuilder(8192).append("<h1>Experiments</h1>\n<p class=\"note\">From the decision "
                + "records on topic ").append(Html.escape(topic)).append(", which every instance of the job reads "
                + "whole: any instance shows every experiment. ").append(Html.whole(history.records()))
                .append(" records read").append(history.isCaughtUp() ? "." : "; still reading the topic, so the "
                + "list may be incomplete.").append(history.rejectedRecords() == 0 ? "" : " "
                + Html.whole(history.rejectedRecords()) + " records on the topic were not valid decision records and "
                + "are left out.").append(" <a href=\"").append(link(options.status(), options.sort(),
                options.refresh())).append("\">Reload</a>.</p>\n");
        filterForm(b, options);
        b.append("<table>\n<caption>").append(rows.size()).append(rows.size() == 1 ? " experiment" : " experiments")
                .append(options.status().equals("all") ? "" : " (" + options.status() + ")")
                .append(", sorted by ").append(options.sort().key()).append("</caption>\n<thead><tr>");
        header(b, "Experiment", Sort.EXPERIMENT, options);
        header(b, "Status", Sort.STATUS, options);
        b.append("<th scope=\"col\">Arms</th><th scope=\"col\">Leader</th>");
        header(b, "P(best) of leader", Sort.PBEST, options);
        header(b, "Traffic (trials)", Sort.TRAFFIC, options);
        b.append("<th scope=\"col\">Pending units</th><th scope=\"col\">Suspended by a guardrail</th>");
        header(b, "Last decision (UTC)", Sort.LAST, options);
        b.append("<th scope=\"col\">Decision and reason</th></tr></thead>\n<tbody>\n");
        for (DecisionRecord r : rows) {
            row(b, r);
        }
        return Html.page("Runoff experiments", b.append("</tbody></table>\n").toString(), options.refresh());
    }

    private static void filterForm(StringBuilder b, Options options) {
        b.append("<form method=\"get\" action=\"/\"><label for=\"status\">Status</label> <select id=\"status\" "
                + "name=\"status\">");
        for (String s : List.of("all", "running", "stopped")) {
            b.append("<option value=\"").append(s).append('"').append(s.equals(options.status()) ? " selected" : "")
                    .append('>').append(s).append("</option>");
        }
        b.append("</select> <input type=\"hidden\" name=\"sort\" value=\"").append(options.sort().key())
                .append("\"> <button type=\"submit\">Show</button></form>\n");
    }

    private static void header(StringBuilder b, String label, Sort sort, Options options) {
        boolean current = sort == options.sort();
        b.append("<th scope=\"col\"").append(current ? " aria-sort=\"" + (descending(sort) ? "descending"
                : "ascending") + "\"" : "").append("><a href=\"").append(link(options.status(), sort, options.refresh()))
                .append("\">").append(label).append("</a>").append(current ? (descending(sort) ? " (sorted, highest "
                + "first)" : " (sorted)") : "").append("</th>");
    }

    private static boolean descending(Sort sort) {
        return sort == Sort.TRAFFIC || sort == Sort.PBEST || sort == Sort.LAST;
    }

    private static String link(String status, Sort sort, int refresh) {
        return "/?status=" + status + "&amp;sort=" + sort.key() + (refresh > 0 ? "&amp;refresh=" + refresh : "");
    }

    private static void row(StringBuilder b, DecisionRecord r) {
        ArmState leader = leader(r);
        String id = r.getExperimentId();
        b.append("<tr><th scope=\"row\"><a href=\"/experiments/")
                .append(Html.escape(URLEncoder.encode(id, StandardCharsets.UTF_8).replace("+", "%20")))
                .append("\">").append(Html.escape(id)).append("</a></th><td>").append(status(r)).append("</td><td>")
                .append(r.getArms().size()).append(": ")
                .append(Html.escape(String.join(", ", r.getArms().stream().map(ArmState::getArm).toList())))
                .append("</td><td>").append(Html.escape(leader.getArm())).append("</td><td class=\"n\">")
                .append(Html.number(leader.getAlpha(), 4)).append("</td><td class=\"n\">").append(Html.whole(trials(r)))
                .append("</td><td class=\"n\">").append(pending(r)).append("</td><td>").append(suspensions(r))
                .append("</td><td>#").append(r.getSequence())
                .append(' ').append(Html.time(r.getStreamTime())).append("</td><td>").append(r.getDecision())
                .append(": ").append(Html.escape(r.getReason())).append("</td></tr>\n");
    }

    /** RUNNING, or STOPPED with the winner (words, not a colour). */
    static String status(DecisionRecord r) {
        return r.getWinner() == null ? "RUNNING" : "STOPPED (winner " + Html.escape(r.getWinner()) + ")";
    }

    private static boolean shown(DecisionRecord r, String status) {
        return switch (status) {
            case "running" -> r.getWinner() == null;
            case "stopped" -> r.getWinner() != null;
            default -> true;
        };
    }

    private static Comparator<DecisionRecord> order(Sort sort) {
        Comparator<DecisionRecord> byId = Comparator.comparing(DecisionRecord::getExperimentId);
        return switch (sort) {
            case EXPERIMENT -> byId;
            case STATUS -> Comparator.comparing((DecisionRecord r) -> r.getWinner() != null).thenComparing(byId);
            case TRAFFIC -> Comparator.comparingLong(OverviewPage::trials).reversed().thenComparing(byId);
            case PBEST -> Comparator.comparingDouble((DecisionRecord r) -> leader(r).getAlpha()).reversed()
                    .thenComparing(byId);
            case LAST -> Comparator.comparingLong(DecisionRecord::getStreamTime).reversed().thenComparing(byId);
        };
    }

    /** The arm with the highest P(best) (the first of equals). */
    static ArmState leader(DecisionRecord r) {
        ArmState best = r.getArms().get(0);
        for (ArmState a : r.getArms()) {
            best = a.getAlpha() > best.getAlpha() ? a : best;
        }
        return best;
    }

    static long trials(DecisionRecord r) {
        return r.getArms().stream().mapToLong(ArmState::getTrials).sum();
    }

    /**
     * The arms the record suspends, each with the guardrail that suspended it ({@code arm (guardrail)}, in
     * definition order), or "none".
     */
    static String suspensions(DecisionRecord r) {
        List<String> suspended = r.getArms().stream().filter(a -> a.getSuspendedBy() != null)
                .map(a -> Html.escape(a.getArm()) + " (" + Html.escape(a.getSuspendedBy()) + ")").toList();
        return suspended.isEmpty() ? "none" : String.join(", ", suspended);
    }

    /** Pending units over all arms, or an en dash when the records do not report them. */
    static String pending(DecisionRecord r) {
        if (r.getArms().stream().allMatch(a -> a.getPending() == null)) {
            return "\u2013";
        }
        return Html.whole(r.getArms().stream().mapToLong(a -> a.getPending() == null ? 0 : a.getPending()).sum());
    }
}
