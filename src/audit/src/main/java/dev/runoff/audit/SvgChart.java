package dev.runoff.audit;

import java.util.ArrayList;
import java.util.List;
import java.util.Locale;
import java.util.function.ToDoubleFunction;

/**
 * A {@link Timeline} as a standalone SVG 1.1 chart: two panels sharing the time axis, the weights published
 * (a step line: a weight holds until the next decision) and the probability of being best (a line with a
 * marker per decision), one series per arm, a legend, axis titles with units, and the STOP marked by a
 * vertical line labelled with the winner. Black text on white; each arm has its own colour and dash pattern,
 * so the series stay apart when printed in grey (the palette and patterns of {@code SvgCanvas}, shared with
 * {@link EvidenceChart}).
 */
public final class SvgChart {

    private static final int WIDTH = 960;
    private static final int HEIGHT = 660;
    private static final int LEFT = 80;
    private static final int PLOT_RIGHT = 760;
    private static final int PANEL_HEIGHT = 220;
    private static final int[] PANEL_TOP = {70, 360};
    private static final int TICKS = 5;

    private final Timeline timeline;
    private final TimeScale scale;
    private final SvgCanvas canvas;
    private final StringBuilder out;

    private SvgChart(Timeline timeline) {
        this.timeline = timeline;
        this.scale = TimeScale.of(timeline);
        this.canvas = new SvgCanvas(WIDTH, HEIGHT, title(timeline));
        this.out = canvas.out;
    }

    private static String title(Timeline timeline) {
        return "Experiment " + timeline.experimentId() + ": weights and P(best) per decision";
    }

    /** The SVG document of {@code timeline}. */
    public static String of(Timeline timeline) {
        return new SvgChart(timeline).render();
    }

    private String render() {
        text(LEFT, 28, "start", 17, "bold", title(timeline));
        text(LEFT, 48, "start", 12, "normal", "First decision " + TimelineWriter.time(scale.start) + " (UTC); "
                + timeline.rows().size() + " decisions");
        panel(0, "weights", "Weight (share of traffic)", Timeline.Point::weight, true);
        panel(1, "p-best", "P(best) (probability)", Timeline.Point::pBest, false);
        text((LEFT + PLOT_RIGHT) / 2, HEIGHT - 18, "middle", 13, "normal", "Time since first decision ("
                + scale.unit + ")");
        legend();
        return canvas.close();
    }

    private void panel(int index, String id, String axisTitle, ToDoubleFunction<Timeline.Point> value, boolean step) {
        int top = PANEL_TOP[index];
        int bottom = top + PANEL_HEIGHT;
        out.append("<g class=\"panel\" id=\"").append(id).append("\">\n");
        for (int t = 0; t <= TICKS; t++) {
            double v = (double) t / TICKS;
            double y = y(top, v);
            line(LEFT, y, PLOT_RIGHT, y, "#d9d9d9", "", 1);
            text(LEFT - 8, y + 4, "end", 12, "normal", String.format(Locale.ROOT, "%.1f", v));
        }
        for (double tick : scale.ticks()) {
            double x = scale.xOfUnits(tick);
            line(x, bottom, x, bottom + 5, "#000000", "", 1);
            text(x, bottom + 20, "middle", 12, "normal", scale.label(tick));
        }
        out.append(String.format(Locale.ROOT, "<rect x=\"%d\" y=\"%d\" width=\"%d\" height=\"%d\" fill=\"none\""
                + " stroke=\"#000000\"/>%n", LEFT, top, PLOT_RIGHT - LEFT, PANEL_HEIGHT));
        canvas.verticalTitle(LEFT - 50, top + PANEL_HEIGHT / 2.0, axisTitle);
        if (index == 0) {
            out.append(SuspensionBands.svg(timeline, scale::x, top, bottom));
        }
        for (int a = 0; a < timeline.arms().size(); a++) {
            series(a, id, top, value, step);
        }
        stopMarker(top, bottom, index == 0);
        out.append("</g>\n");
    }

    private void series(int a, String panel, int top, ToDoubleFunction<Timeline.Point> value, boolean step) {
        String arm = timeline.arms().get(a);
        List<double[]> points = new ArrayList<>();
        double lastX = Double.NaN;
        for (Timeline.Row row : timeline.rows()) {
            Timeline.Point p = row.points().get(arm);
            if (p == null) {
                continue;
            }
            double x = scale.x(row.streamTime());
            double y = y(top, value.applyAsDouble(p));
            if (step && !points.isEmpty()) {
                points.add(new double[] {x, points.get(points.size() - 1)[1]});
            }
            points.add(new double[] {x, y});
            lastX = x;
        }
        if (step && !points.isEmpty() && lastX < PLOT_RIGHT) {
            points.add(new double[] {PLOT_RIGHT, points.get(points.size() - 1)[1]});
        }
        out.append("<g class=\"series\" data-panel=\"").append(panel).append("\" data-arm=\"")
                .append(SvgCanvas.escape(arm)).append("\">\n<polyline fill=\"none\" stroke=\"")
                .append(SvgCanvas.colour(a)).append("\" stroke-width=\"2\"").append(SvgCanvas.dashAttribute(a))
                .append(" points=\"");
        for (int i = 0; i < points.size(); i++) {
            out.append(i == 0 ? "" : " ").append(String.format(Locale.ROOT, "%.1f,%.1f", points.get(i)[0],
                    points.get(i)[1]));
        }
        out.append("\"/>\n");
        if (!step) {
            for (double[] p : points) {
                out.append(String.format(Locale.ROOT, "<circle cx=\"%.1f\" cy=\"%.1f\" r=\"2.5\" fill=\"%s\"/>%n",
                        p[0], p[1], SvgCanvas.colour(a)));
            }
        }
        out.append("</g>\n");
    }

    private void stopMarker(int top, int bottom, boolean labelled) {
        Timeline.Row stop = timeline.stop();
        if (stop == null) {
            return;
        }
        double x = scale.x(stop.streamTime());
        out.append("<g class=\"stop\">\n");
        line(x, top, x, bottom, "#000000", "5 3", 1.5);
        if (labelled) {
            text(Math.min(x, PLOT_RIGHT - 4), top - 6, "end", 12, "bold", "STOP at decision " + stop.sequence()
                    + ": winner " + stop.winner() + " (" + stop.reason() + ")");
        }
        out.append("</g>\n");
    }

    private void legend() {
        int x = PLOT_RIGHT + 24;
        int y = PANEL_TOP[0] + 6;
        out.append("<g class=\"legend\">\n");
        text(x, y, "start", 13, "bold", "Arms");
        for (int a = 0; a < timeline.arms().size(); a++) {
            canvas.legendEntry(x, y + 22 + a * 22, a, timeline.arms().get(a));
        }
        double ny = y + 44 + timeline.arms().size() * 22;
        if (timeline.stop() != null) {
            line(x, ny - 4, x + 36, ny - 4, "#000000", "5 3", 1.5);
            text(x + 44, ny, "start", 13, "normal", "STOP");
        }
        out.append("</g>\n");
    }

    private static double y(int top, double value) {
        return top + PANEL_HEIGHT * (1 - value);
    }

    private void line(double x1, double y1, double x2, double y2, String stroke, String dash, double width) {
        canvas.line(x1, y1, x2, y2, stroke, dash, width);
    }

    private void text(double x, double y, String anchor, int size, String weight, String content) {
        canvas.text(x, y, anchor, size, weight, content);
    }

    /** Maps stream time to the x axis, in a unit chosen from the time span, with round tick steps. */
    private static final class TimeScale {
        private static final long SECOND = 1_000;
        private static final long MINUTE = 60 * SECOND;
        private static final long HOUR = 60 * MINUTE;
        private static final long DAY = 24 * HOUR;

        final long start;
        final long span;
        final String unit;
        final long unitMillis;
        final double step;

        private TimeScale(long start, long span, String unit, long unitMillis) {
            this.start = start;
            this.span = span;
            this.unit = unit;
            this.unitMillis = unitMillis;
            this.step = SvgCanvas.roundStep((double) span / unitMillis / TICKS);
        }

        static TimeScale of(Timeline timeline) {
            long start = timeline.rows().stream().mapToLong(Timeline.Row::streamTime).min().orElse(0);
            long end = timeline.rows().stream().mapToLong(Timeline.Row::streamTime).max().orElse(start);
            long span = Math.max(1, end - start);
            if (span < 2 * MINUTE) {
                return new TimeScale(start, span, "seconds", SECOND);
            }
            if (span < 2 * HOUR) {
                return new TimeScale(start, span, "minutes", MINUTE);
            }
            return span < 2 * DAY ? new TimeScale(start, span, "hours", HOUR) : new TimeScale(start, span, "days", DAY);
        }

        double x(long time) {
            return LEFT + (PLOT_RIGHT - LEFT) * (double) (time - start) / span;
        }

        double xOfUnits(double units) {
            return LEFT + (PLOT_RIGHT - LEFT) * units * unitMillis / span;
        }

        /** Tick values in the axis unit: multiples of the step up to the span. */
        List<Double> ticks() {
            double units = (double) span / unitMillis;
            List<Double> ticks = new ArrayList<>();
            for (int i = 0; i * step <= units * (1 + 1e-9); i++) {
                ticks.add(i * step);
            }
            return ticks;
        }

        String label(double value) {
            int decimals = step >= 1 ? 0 : (int) Math.ceil(-Math.log10(step) - 1e-9);
            return String.format(Locale.ROOT, "%." + decimals + "f", value);
        }
    }
}
