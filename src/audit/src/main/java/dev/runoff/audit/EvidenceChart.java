package dev.runoff.audit;

import dev.runoff.decision.Evidence;
import java.util.ArrayList;
import java.util.List;
import java.util.Locale;

/**
 * The evidence view as a standalone SVG 1.1 chart: the evidence against each losing arm, {@code -ln P(best)},
 * against the experiment's total trials, on a log-probability axis (ticks at P(best) = 10^-k; height is
 * proportional to {@code -ln P}), so that an arm being ruled out at a constant exponential rate is a straight
 * line whose slope is the rate. Point values are joined by a line with a marker per decision; a lower bound
 * (a zero probability) is an open triangle pointing up and is not joined. The rates the planner predicts for
 * the estimated arm rates are drawn from the origin as reference slopes: {@code Gamma*_beta} (what top-two
 * sampling with the rule's beta reaches) and the uniform split's rate. Arms keep their colours from
 * {@link SvgChart}.
 */
public final class EvidenceChart {

    private static final int WIDTH = 960;
    private static final int HEIGHT = 580;
    private static final int LEFT = 90;
    private static final int PLOT_RIGHT = 740;
    private static final int TOP = 80;
    private static final int BOTTOM = 500;
    private static final double LN10 = StrictMath.log(10);

    private final Timeline timeline;
    private final EvidenceView view;
    private final SvgCanvas canvas;
    private final double maxTrials;
    private final double maxEvidence;

    private EvidenceChart(Timeline timeline, EvidenceView view) {
        if (timeline.rows().size() != view.rows().size()) {
            throw new IllegalArgumentException("timeline has " + timeline.rows().size() + " decisions, evidence "
                    + view.rows().size());
        }
        this.timeline = timeline;
        this.view = view;
        this.canvas = new SvgCanvas(WIDTH, HEIGHT, title(timeline));
        this.maxTrials = Math.max(1, view.rows().stream().mapToLong(Evidence.Row::totalTrials).max().orElse(1));
        double max = view.rows().stream().flatMap(r -> r.points().values().stream())
                .mapToDouble(Evidence.Point::evidence).max().orElse(0);
        this.maxEvidence = Math.max(LN10, max * 1.05);
    }

    /** The SVG document of the evidence view of {@code timeline}. */
    public static String of(Timeline timeline, EvidenceView view) {
        return new EvidenceChart(timeline, view).render();
    }

    private static String title(Timeline timeline) {
        return "Experiment " + timeline.experimentId() + ": evidence against each losing arm";
    }

    private String render() {
        canvas.text(LEFT, 28, "start", 17, "bold", title(timeline));
        canvas.text(LEFT, 48, "start", 12, "normal", Evidence.balanceLine(view.balance(), view.last()));
        canvas.text(LEFT, 66, "start", 12, "normal", "Height: -ln P(best); slope: growth per 1,000 trials. Open"
                + " triangles: P(best) 0, drawn at a lower bound.");
        axes();
        for (int a = 0; a < timeline.arms().size(); a++) {
            series(a);
        }
        references();
        legend();
        return canvas.close();
    }

    private void axes() {
        canvas.out.append("<g class=\"axes\">\n");
        int step = Math.max(1, (int) SvgCanvas.roundStep(maxEvidence / LN10 / 6));
        for (int k = 0; k * LN10 <= maxEvidence; k += step) {
            double y = y(k * LN10);
            canvas.line(LEFT, y, PLOT_RIGHT, y, "#d9d9d9", "", 1);
            canvas.text(LEFT - 8, y + 4, "end", 12, "normal", k == 0 ? "1" : "1e-" + k);
        }
        boolean thousands = maxTrials >= 10_000;
        double unit = thousands ? 1000 : 1;
        double xStep = SvgCanvas.roundStep(maxTrials / unit / 5);
        for (int i = 0; i * xStep * unit <= maxTrials * (1 + 1e-9); i++) {
            double x = x(i * xStep * unit);
            canvas.line(x, BOTTOM, x, BOTTOM + 5, "#000000", "", 1);
            canvas.text(x, BOTTOM + 20, "middle", 12, "normal", label(i * xStep));
        }
        canvas.out.append(String.format(Locale.ROOT, "<rect x=\"%d\" y=\"%d\" width=\"%d\" height=\"%d\""
                + " fill=\"none\" stroke=\"#000000\"/>%n", LEFT, TOP, PLOT_RIGHT - LEFT, BOTTOM - TOP));
        canvas.verticalTitle(LEFT - 62, (TOP + BOTTOM) / 2.0, "P(best) of the arm (log scale)");
        canvas.text((LEFT + PLOT_RIGHT) / 2.0, BOTTOM + 44, "middle", 13, "normal", "Trials, all arms"
                + (thousands ? " (thousands)" : ""));
        canvas.out.append("</g>\n");
    }

    private void series(int a) {
        String arm = timeline.arms().get(a);
        List<double[]> line = new ArrayList<>();
        List<double[]> bounds = new ArrayList<>();
        for (Evidence.Row row : view.rows()) {
            Evidence.Point p = row.points().get(arm);
            if (p != null) {
                (p.isBound() ? bounds : line).add(new double[] {x(row.totalTrials()), y(p.evidence())});
            }
        }
        if (line.isEmpty() && bounds.isEmpty()) {
            return;
        }
        StringBuilder out = canvas.out;
        String colour = SvgCanvas.colour(a);
        out.append("<g class=\"series\" data-panel=\"evidence\" data-arm=\"").append(SvgCanvas.escape(arm))
                .append("\">\n<polyline fill=\"none\" stroke=\"").append(colour).append("\" stroke-width=\"2\"")
                .append(SvgCanvas.dashAttribute(a)).append(" points=\"");
        for (int i = 0; i < line.size(); i++) {
            out.append(i == 0 ? "" : " ").append(SvgCanvas.fmt(line.get(i)[0])).append(',')
                    .append(SvgCanvas.fmt(line.get(i)[1]));
        }
        out.append("\"/>\n");
        for (double[] p : line) {
            out.append(String.format(Locale.ROOT, "<circle cx=\"%.1f\" cy=\"%.1f\" r=\"2.5\" fill=\"%s\"/>%n", p[0],
                    p[1], colour));
        }
        for (double[] p : bounds) {
            out.append(String.format(Locale.ROOT, "<polygon class=\"bound\" points=\"%.1f,%.1f %.1f,%.1f %.1f,%.1f\""
                    + " fill=\"#ffffff\" stroke=\"%s\" stroke-width=\"1.5\"/>%n", p[0] - 4, p[1] + 3, p[0] + 4,
                    p[1] + 3, p[0], p[1] - 5, colour));
        }
        out.append("</g>\n");
    }

    private void references() {
        Evidence.Reference ref = view.reference();
        if (ref == null) {
            return;
        }
        if (!Double.isNaN(ref.betaOptimal())) {
            reference("beta-optimal", ref.betaOptimal(), "#000000", "9 5");
        }
        reference("uniform", ref.uniform(), "#777777", "2 4");
    }

    /** A line from the origin with {@code ratePerThousand}, cut at the plot's edge. */
    private void reference(String id, double ratePerThousand, String stroke, String dash) {
        double slope = ratePerThousand / 1000;
        double endTrials = Math.min(maxTrials, maxEvidence / slope);
        canvas.out.append("<g class=\"reference\" data-rate=\"").append(id).append("\" data-per-1000-trials=\"")
                .append(String.format(Locale.ROOT, "%.6g", ratePerThousand)).append("\">\n");
        canvas.line(x(0), y(0), x(endTrials), y(slope * endTrials), stroke, dash, 2);
        canvas.out.append("</g>\n");
    }

    private void legend() {
        int x = PLOT_RIGHT + 20;
        double y = TOP + 6;
        canvas.out.append("<g class=\"legend\">\n");
        canvas.text(x, y, "start", 13, "bold", "Arms");
        for (int a = 0; a < timeline.arms().size(); a++) {
            y += 22;
            canvas.legendEntry(x, y, a, timeline.arms().get(a));
        }
        Evidence.Reference ref = view.reference();
        if (ref != null) {
            y += 34;
            canvas.text(x, y, "start", 13, "bold", "Predicted rates");
            y += 18;
            canvas.text(x, y, "start", 12, "normal", String.format(Locale.ROOT, "per 1,000 trials, beta %.2g",
                    ref.beta()));
            if (!Double.isNaN(ref.betaOptimal())) {
                y += 22;
                canvas.line(x, y - 4, x + 36, y - 4, "#000000", "9 5", 2);
                canvas.text(x + 44, y, "start", 12, "normal", String.format(Locale.ROOT, "Gamma*_beta %.3g",
                        ref.betaOptimal()));
            }
            y += 22;
            canvas.line(x, y - 4, x + 36, y - 4, "#777777", "2 4", 2);
            canvas.text(x + 44, y, "start", 12, "normal", String.format(Locale.ROOT, "uniform %.3g", ref.uniform()));
        }
        canvas.out.append("</g>\n");
    }

    private double x(double trials) {
        return LEFT + (PLOT_RIGHT - LEFT) * trials / maxTrials;
    }

    private double y(double evidence) {
        return BOTTOM - (BOTTOM - TOP) * evidence / maxEvidence;
    }

    private static String label(double value) {
        return value == Math.rint(value) ? String.format(Locale.ROOT, "%.0f", value)
                : String.format(Locale.ROOT, "%s", value);
    }
}
