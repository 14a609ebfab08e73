package dev.runoff.audit;

import java.util.Locale;
import java.util.function.LongToDoubleFunction;

/**
 * The periods in which a guardrail suspended an arm, drawn as shaded bands over the weights panel of
 * {@link SvgChart}: one band per arm and run of consecutive suspended decisions, from the first of them to the
 * decision after the last (the suspension held until then), labelled with the arm and the guardrail.
 */
final class SuspensionBands {

    private static final String FILL = "#999999";

    private SuspensionBands() {
    }

    /**
     * The SVG group of the bands of {@code timeline} between {@code top} and {@code bottom}, empty when no arm
     * was suspended.
     *
     * @param x the horizontal position of a stream time
     */
    static String svg(Timeline timeline, LongToDoubleFunction x, int top, int bottom) {
        StringBuilder out = new StringBuilder();
        int rows = timeline.rows().size();
        for (String arm : timeline.arms()) {
            int i = 0;
            while (i < rows) {
                String guardrail = suspendedBy(timeline.rows().get(i), arm);
                if (guardrail == null) {
                    i++;
                    continue;
                }
                int first = i;
                while (i < rows && guardrail.equals(suspendedBy(timeline.rows().get(i), arm))) {
                    i++;
                }
                double from = x.applyAsDouble(timeline.rows().get(first).streamTime());
                double to = x.applyAsDouble(timeline.rows().get(Math.min(i, rows - 1)).streamTime());
                out.append(String.format(Locale.ROOT, "<rect x=\"%.1f\" y=\"%d\" width=\"%.1f\" height=\"%d\""
                        + " fill=\"%s\" fill-opacity=\"0.18\"><title>%s</title></rect>%n", from, top,
                        Math.max(1, to - from), bottom - top, FILL, SvgCanvas.escape(arm + " suspended by guardrail "
                                + guardrail + " from decision " + timeline.rows().get(first).sequence())));
                out.append(String.format(Locale.ROOT, "<text x=\"%.1f\" y=\"%d\" font-size=\"11\""
                        + " fill=\"#444444\">%s</text>%n", from + 3, bottom - 6,
                        SvgCanvas.escape(arm + " suspended (" + guardrail + ")")));
            }
        }
        return out.isEmpty() ? "" : "<g class=\"suspended\">\n" + out + "</g>\n";
    }

    private static String suspendedBy(Timeline.Row row, String arm) {
        Timeline.Point point = row.points().get(arm);
        return point == null ? null : point.suspendedBy();
    }
}
