package dev.runoff.job.pages;

import dev.runoff.records.avro.ArmState;
import dev.runoff.records.avro.BetaParams;
import dev.runoff.records.avro.DecisionRecord;
import java.util.ArrayList;
import java.util.List;
import java.util.function.BiConsumer;
import java.util.function.ToDoubleBiFunction;

/**
 * The page at {@code /experiments/{id}} (for a browser): the weights and P(best) over the experiment's
 * decision records as SVG line charts, the per-arm table of the latest record, the
 * evidence against each losing arm ({@link EvidenceSection}), the stopping statistic against its threshold, and
 * the planner's prediction of the remaining traffic.
 *
 * <p>The page is a list of {@link #SECTIONS}, each drawing from the experiment's {@link ExperimentHistory}; a
 * further view of the same records is one more entry in that list.
 */
final class ExperimentPage {

    /** The sections of the page, in order. */
    private static final List<BiConsumer<StringBuilder, View>> SECTIONS = List.of(ExperimentPage::summary,
            ExperimentPage::charts, ExperimentPage::armTable, ExperimentPage::evidence, ExperimentPage::stopping,
            ExperimentPage::remaining);

    /**
     * What a section draws from.
     *
     * @param latest the latest decision record
     * @param points the chart points, oldest first
     */
    record View(DecisionRecord latest, List<DecisionPoint> points) {
    }

    private ExperimentPage() {
    }

    static String render(ExperimentHistory history, int refresh) {
        View view = new View(history.latest(), history.points());
        String id = view.latest().getExperimentId();
        StringBuilder b = new StringBuilder(16_384).append("<p><a href=\"/\">All experiments</a></p>\n<h1>Experiment ")
                .append(Html.escape(id)).append("</h1>\n");
        for (BiConsumer<StringBuilder, View> section : SECTIONS) {
            section.accept(b, view);
        }
        return Html.page("Experiment " + id, b.toString(), refresh);
    }

    private static void summary(StringBuilder b, View v) {
        DecisionRecord r = v.latest();
        b.append("<p>Status: <strong>").append(OverviewPage.status(r)).append("</strong>. Latest decision #")
                .append(r.getSequence()).append(" at ").append(Html.time(r.getStreamTime())).append(" UTC: ")
                .append(r.getDecision()).append(" (").append(Html.escape(r.getReason())).append("). Definition version ")
                .append(r.getDefinitionVersion()).append(", metric ").append(r.getDefinition().getMetric().getKind())
                .append(", allocation ").append(r.getAllocationRule()).append(", stopping rule ")
                .append(r.getStoppingRule()).append(" at delta ").append(r.getDelta()).append(".</p>\n")
                .append("<p class=\"note\">Charts cover ").append(v.points().size()).append(" decision records"
                + " (at most ").append(ExperimentHistory.MAX_POINTS).append(" kept; a longer run is thinned evenly). "
                + "The same state as JSON: this address with <code>Accept: application/json</code>.</p>\n");
    }

    private static void charts(StringBuilder b, View v) {
        List<String> arms = v.latest().getArms().stream().map(ArmState::getArm).toList();
        double[] xs = elapsed(v.points());
        String unit = unit(xs);
        double[] scaled = scale(xs, unit);
        String xLabel = "time since the first charted decision (" + unit + ")";
        b.append("<h2>Weights and P(best) over time</h2>\n")
                .append(LineChart.svg("weights", "Published weight per arm", xLabel, scaled, 1.0,
                        series(arms, v.points(), (p, arm) -> p.weight(arm))))
                .append('\n').append(LineChart.svg("pbest", "P(best) per arm", xLabel, scaled, 1.0,
                        series(arms, v.points(), (p, arm) -> p.alpha(arm)))).append('\n');
        if (v.points().stream().anyMatch(p -> p.statistic() != null && p.threshold() != null)) {
            double top = v.points().stream().mapToDouble(p -> Math.max(value(p.statistic()), value(p.threshold())))
                    .max().orElse(1);
            double[] stat = v.points().stream().mapToDouble(p -> orNaN(p.statistic())).toArray();
            double[] threshold = v.points().stream().mapToDouble(p -> orNaN(p.threshold())).toArray();
            b.append(LineChart.svg("stopping", "Stopping statistic and its threshold", xLabel, scaled,
                    top > 0 ? top * 1.1 : 1, List.of(new LineChart.Series("statistic", stat),
                            new LineChart.Series("threshold", threshold)))).append('\n');
        }
    }

    private static void armTable(StringBuilder b, View v) {
        DecisionRecord r = v.latest();
        boolean rates = r.getArms().get(0).getPosterior() instanceof BetaParams;
        b.append("<h2>Arms</h2>\n<table>\n<caption>Arms at decision #").append(r.getSequence())
                .append("</caption>\n<thead><tr><th scope=\"col\">Arm</th><th scope=\"col\">Trials</th>")
                .append(rates ? "<th scope=\"col\">Successes</th><th scope=\"col\">Rate</th>"
                        : "<th scope=\"col\">Mean</th>")
                .append("<th scope=\"col\">Pending units</th><th scope=\"col\">P(best)</th><th scope=\"col\">s.e."
                        + "</th><th scope=\"col\">Weight before guards</th><th scope=\"col\">Weight</th></tr></thead>\n"
                        + "<tbody>\n");
        ArmState leader = OverviewPage.leader(r);
        for (ArmState a : r.getArms()) {
            b.append("<tr><th scope=\"row\">").append(Html.escape(a.getArm())).append(a == leader ? " (leader)" : "")
                    .append(a.getSuspendedBy() == null ? ""
                            : " (suspended by " + Html.escape(a.getSuspendedBy()) + ")")
                    .append("</th><td class=\"n\">").append(Html.whole(a.getTrials())).append("</td>");
            if (rates) {
                long successes = a.getSuccesses() == null ? 0 : a.getSuccesses();
                b.append("<td class=\"n\">").append(Html.whole(successes)).append("</td><td class=\"n\">")
                        .append(a.getTrials() == 0 ? "\u2013" : Html.number(100.0 * successes / a.getTrials(), 2) + "%")
                        .append("</td>");
            } else {
                b.append("<td class=\"n\">").append(Html.number(a.getMean(), 4)).append("</td>");
            }
            b.append("<td class=\"n\">").append(a.getPending() == null ? "\u2013" : Html.whole(a.getPending()))
                    .append("</td><td class=\"n\">").append(Html.number(a.getAlpha(), 4)).append("</td><td class=\"n\">")
                    .append(Html.number(a.getAlphaStandardError(), 4)).append("</td><td class=\"n\">")
                    .append(Html.number(a.getWeightBeforeGuards(), 3)).append("</td><td class=\"n\">")
                    .append(Html.number(a.getWeight(), 3)).append("</td></tr>\n");
        }
        b.append("</tbody></table>\n");
    }

    private static void evidence(StringBuilder b, View v) {
        EvidenceSection.render(b, v.points());
    }

    private static void stopping(StringBuilder b, View v) {
        DecisionRecord r = v.latest();
        b.append("<h2>Stopping</h2>\n<p>");
        if (r.getStatistic() == null || r.getThreshold() == null) {
            b.append("The ").append(r.getStoppingRule()).append(" rule reported no statistic at this decision (")
                    .append(Html.escape(r.getReason())).append(").");
        } else {
            boolean reached = r.getStatistic() >= r.getThreshold();
            b.append("Statistic <strong>").append(Html.number(r.getStatistic(), 2)).append("</strong> ")
                    .append(reached ? "&ge;" : "&lt;").append(" threshold <strong>")
                    .append(Html.number(r.getThreshold(), 2)).append("</strong> (").append(r.getStoppingRule())
                    .append(" at delta ").append(r.getDelta()).append("): ").append(reached ? "threshold reached"
                            : "below the threshold, " + Html.number(100 * r.getStatistic() / r.getThreshold(), 0)
                            + "% of the way").append('.');
        }
        b.append("</p>\n");
    }

    private static void remaining(StringBuilder b, View v) {
        RemainingTraffic t = RemainingTraffic.of(v.latest());
        b.append("<h2>Predicted remaining traffic</h2>\n<p>");
        if (t.remaining() < 0) {
            b.append("No prediction: ").append(Html.escape(t.note())).append('.');
        } else {
            b.append("About <strong>").append(Html.whole(t.remaining())).append("</strong> more trials (predicted "
                    + "total ").append(Html.whole(t.predictedTotal())).append("; ")
                    .append(Html.escape(t.note())).append(").");
        }
        b.append("</p>\n<p class=\"note\">The planner's characteristic time T_w (Garivier and Kaufmann 2016) at the "
                + "current estimates, times the stopping threshold: a guide that moves as the estimates do.</p>\n");
    }

    private static List<LineChart.Series> series(List<String> arms, List<DecisionPoint> points,
                                                 ToDoubleBiFunction<DecisionPoint, String> value) {
        List<LineChart.Series> out = new ArrayList<>(arms.size());
        for (String arm : arms) {
            out.add(new LineChart.Series(arm, points.stream().mapToDouble(p -> value.applyAsDouble(p, arm)).toArray()));
        }
        return out;
    }

    private static double[] elapsed(List<DecisionPoint> points) {
        long first = points.isEmpty() ? 0 : points.get(0).streamTime();
        return points.stream().mapToDouble(p -> (p.streamTime() - first) / 1000.0).toArray();
    }

    private static String unit(double[] seconds) {
        double span = seconds.length == 0 ? 0 : seconds[seconds.length - 1];
        return span > 7200 ? "h" : span > 120 ? "min" : "s";
    }

    private static double[] scale(double[] seconds, String unit) {
        double per = switch (unit) {
            case "h" -> 3600;
            case "min" -> 60;
            default -> 1;
        };
        double[] out = new double[seconds.length];
        for (int i = 0; i < out.length; i++) {
            out[i] = seconds[i] / per;
        }
        return out;
    }

    private static double value(Double d) {
        return d == null || !Double.isFinite(d) ? 0 : d;
    }

    private static double orNaN(Double d) {
        return d == null ? Double.NaN : d;
    }
}
