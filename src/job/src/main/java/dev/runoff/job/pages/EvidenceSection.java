package dev.runoff.job.pages;

import dev.runoff.decision.Evidence;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;

/**
 * The evidence section of the experiment page: at the latest decision, the evidence against each losing arm,
 * {@code -ln P(best)} (a lower bound where {@link Evidence} marks a zero), its growth per 1,000 trials and
 * the balance verdict in the words of the audit report, and a chart of the evidence against the trials.
 *
 * <p>The numbers are the records' own P(best) values: unlike the audit, the page does not recompute Monte
 * Carlo values by numerical integration (that would cost a quadrature per arm on every request), so a P(best)
 * of zero shows as a lower bound. The slopes run over the page's chart points, which past
 * {@value ExperimentHistory#MAX_POINTS} decisions are thinned evenly (every other one dropped): with steady
 * traffic per decision the window (the decisions in the last half of the trials) still holds about half of the
 * 120 to 240 points kept, far above the {@value Evidence#MIN_POINTS} a slope needs, and a least-squares slope
 * over an evenly thinned series estimates the same growth (EvidenceSectionTest checks both).
 */
final class EvidenceSection {

    private EvidenceSection() {
    }

    /** Appends the section for the chart points {@code points}, oldest first, the last one the latest record. */
    static void render(StringBuilder b, List<DecisionPoint> points) {
        List<Evidence.Row> rows = Evidence.of(points.stream().map(DecisionPoint::evidence).toList());
        Evidence.Row last = rows.get(rows.size() - 1);
        b.append("<h2>Evidence against the losing arms</h2>\n");
        if (last.points().isEmpty()) {
            b.append("<p>No losing arm at this decision.</p>\n");
            return;
        }
        chart(b, points, rows);
        table(b, points.get(points.size() - 1).sequence(), last);
        b.append("<p>").append(Html.escape(Evidence.balanceLine(Evidence.balance(last), last))).append(".</p>\n")
                .append("<p class=\"note\">Evidence is -ln P(best): it grows about linearly in the trials while an "
                        + "arm is being ruled out, and top-two sampling drives the losing arms to one common rate "
                        + "(Russo 2020). Values as the decision records state them, without recomputation: a P(best) "
                        + "of zero is shown as a lower bound (&ge;), never as infinite evidence; "
                        + "<code>audit report</code> recomputes Monte Carlo values exactly for up to ")
                .append(Evidence.MAX_EXACT_ARMS).append(" arms, so its figures can differ. Growth: least-squares "
                        + "slope over the charted decisions in the last ").append(Evidence.windowShare())
                .append(" of the trials (bounds left out).</p>\n");
    }

    private static void table(StringBuilder b, long sequence, Evidence.Row last) {
        b.append("<table>\n<caption>Evidence at decision #").append(sequence).append(" (")
                .append(Html.whole(last.totalTrials())).append(" trials; leader ").append(Html.escape(last.leader()))
                .append(")</caption>\n<thead><tr><th scope=\"col\">Arm</th><th scope=\"col\">Evidence, -ln P(best)"
                        + "</th><th scope=\"col\">From</th><th scope=\"col\">Growth per 1,000 trials</th></tr>"
                        + "</thead>\n<tbody>\n");
        last.points().forEach((arm, p) -> b.append("<tr><th scope=\"row\">").append(Html.escape(arm))
                .append("</th><td class=\"n\">").append(p.isBound() ? "&ge; " : "")
                .append(Evidence.number(p.evidence())).append("</td><td>").append(p.source().description())
                .append("</td><td class=\"n\">")
                .append(Double.isNaN(p.ratePerThousand()) ? "n/a" : Evidence.number(p.ratePerThousand()))
                .append("</td></tr>\n"));
        b.append("</tbody></table>\n");
    }

    /**
     * Evidence against the trials (thousands), one line per arm of the latest record in its order, so that each
     * arm keeps the colour and marker it has in the page's other charts; the current leader's line holds only
     * the decisions at which it was losing, and the title names it (a legend entry has room for an arm's name
     * only).
     */
    private static void chart(StringBuilder b, List<DecisionPoint> points, List<Evidence.Row> rows) {
        double[] xs = rows.stream().mapToDouble(r -> r.totalTrials() / 1000.0).toArray();
        String leader = rows.get(rows.size() - 1).leader();
        List<LineChart.Series> series = new ArrayList<>();
        double top = 0;
        for (String arm : points.get(points.size() - 1).arms()) {
            double[] ys = rows.stream().mapToDouble(r -> value(r.points().get(arm))).toArray();
            top = Math.max(top, Arrays.stream(ys).filter(y -> !Double.isNaN(y)).max().orElse(0));
            series.add(new LineChart.Series(arm, ys));
        }
        b.append(LineChart.svg("evidence", "Evidence against each losing arm, -ln P(best); leader now: " + leader,
                "trials so far (thousands); bounds not drawn", xs, top > 0 ? top * 1.1 : 1, series)).append('\n');
    }

    private static double value(Evidence.Point p) {
        return p == null || p.isBound() ? Double.NaN : p.evidence();
    }
}
