package dev.runoff.job.pages;

import java.util.List;
import java.util.Locale;

/**
 * A line chart as inline SVG, drawn on the server: one line per series over a shared x axis, y from 0 to
 * {@code yMax}. Colour is never the only carrier of meaning: each series also has its own dash pattern and
 * marker shape, and its name is written beside its last point and in the legend. The SVG carries a title
 * and a description for screen readers; the page's tables hold the same numbers.
 */
final class LineChart {

    /** Width of the drawing in SVG units (and CSS pixels). */
    static final int WIDTH = 760;
    /** Height of the drawing. */
    static final int HEIGHT = 300;
    private static final int LEFT = 56;
    private static final int RIGHT = 170;
    private static final int TOP = 28;
    private static final int BOTTOM = 44;
    /**
     * Line colours: the four Okabe-Ito colours (Okabe and Ito 2008) that keep a 3:1 contrast against white
     * (WCAG 2.1 success criterion 1.4.11), then black, a dark ochre, a purple and a grey that keep it too.
     */
    static final String[] COLOURS = {"#0072B2", "#D55E00", "#009E73", "#CC79A7", "#000000", "#996600", "#5D3A9B",
        "#666666"};
    private static final String[] DASHES = {"", "8 4", "2 3", "10 3 2 3", "4 4", "12 4 4 4", "1 2", "6 2 2 2"};

    /**
     * One line.
     *
     * @param name the series name (escaped when drawn)
     * @param ys   one value per x; NaN leaves a gap
     */
    record Series(String name, double[] ys) {
    }

    private LineChart() {
    }

    /**
     * The chart as an {@code <svg>} element.
     *
     * @param id     an id for the title element, unique in the page
     * @param title  the chart's title (escaped here)
     * @param xLabel what x measures (escaped here)
     * @param xs     the x values, ascending
     * @param yMax   top of the y axis, &gt; 0
     */
    static String svg(String id, String title, String xLabel, double[] xs, double yMax, List<Series> series) {
        StringBuilder b = new StringBuilder(4096);
        b.append("<svg xmlns=\"http://www.w3.org/2000/svg\" role=\"img\" width=\"").append(WIDTH).append("\" height=\"")
                .append(HEIGHT).append("\" viewBox=\"0 0 ").append(WIDTH).append(' ').append(HEIGHT)
                .append("\" aria-labelledby=\"").append(id).append("-t ").append(id).append("-d\">")
                .append("<title id=\"").append(id).append("-t\">").append(Html.escape(title)).append("</title>")
                .append("<desc id=\"").append(id).append("-d\">").append(series.size()).append(" lines over ")
                .append(xs.length).append(" decisions; the table below the charts holds the latest values.</desc>")
                .append("<rect width=\"100%\" height=\"100%\" fill=\"" + Html.BACKGROUND + "\"/>")
                .append(text(LEFT, 18, "start", title, "font-weight:bold"));
        double xMin = xs.length == 0 ? 0 : xs[0];
        double xMax = xs.length == 0 ? 1 : Math.max(xs[xs.length - 1], xMin + 1e-9);
        axes(b, xMin, xMax, yMax, xLabel);
        for (int s = 0; s < series.size(); s++) {
            line(b, s, series.get(s), xs, xMin, xMax, yMax);
        }
        return b.append("</svg>").toString();
    }

    private static void axes(StringBuilder b, double xMin, double xMax, double yMax, String xLabel) {
        int plotRight = WIDTH - RIGHT;
        int plotBottom = HEIGHT - BOTTOM;
        for (int i = 0; i <= 4; i++) {
            double v = yMax * i / 4;
            double y = y(v, yMax);
            b.append(segment(LEFT, y, plotRight, y, "#bbbbbb"));
            b.append(text(LEFT - 6, y + 4, "end", tick(v), ""));
        }
        for (int i = 0; i <= 4; i++) {
            double v = xMin + (xMax - xMin) * i / 4;
            double x = x(v, xMin, xMax);
            b.append(text(x, plotBottom + 16, "middle", tick(v), ""));
        }
        b.append(segment(LEFT, plotBottom, plotRight, plotBottom, Html.TEXT));
        b.append(segment(LEFT, TOP, LEFT, plotBottom, Html.TEXT));
        b.append(text((LEFT + plotRight) / 2.0, HEIGHT - 8, "middle", xLabel, ""));
    }

    private static void line(StringBuilder b, int s, Series series, double[] xs, double xMin, double xMax,
                             double yMax) {
        String colour = COLOURS[s % COLOURS.length];
        String dash = DASHES[s % DASHES.length];
        StringBuilder path = new StringBuilder();
        boolean pen = false;
        double lastX = Double.NaN;
        double lastY = Double.NaN;
        for (int i = 0; i < xs.length && i < series.ys().length; i++) {
            double v = series.ys()[i];
            if (!Double.isFinite(v)) {
                pen = false;
                continue;
            }
            lastX = x(xs[i], xMin, xMax);
            lastY = y(Math.min(v, yMax), yMax);
            path.append(pen ? " L" : " M").append(String.format(Locale.ROOT, "%.1f %.1f", lastX, lastY));
            pen = true;
        }
        b.append("<g><path fill=\"none\" stroke-width=\"2.5\" stroke=\"").append(colour).append('"');
        if (!dash.isEmpty()) {
            b.append(" stroke-dasharray=\"").append(dash).append('"');
        }
        b.append(" d=\"").append(path.length() == 0 ? "M0 0" : path.toString().trim()).append("\"/>");
        if (Double.isFinite(lastX)) {
            b.append(marker(s, lastX, lastY, colour));
        }
        double legendY = TOP + 6 + s * 18;
        int legendX = WIDTH - RIGHT + 12;
        b.append(String.format(Locale.ROOT, "<line x1=\"%d\" y1=\"%.1f\" x2=\"%d\" y2=\"%.1f\" stroke=\"%s\" "
                + "stroke-width=\"2.5\"%s/>", legendX, legendY, legendX + 26, legendY, colour,
                dash.isEmpty() ? "" : " stroke-dasharray=\"" + dash + "\""));
        b.append(marker(s, legendX + 13, legendY, colour));
        b.append(text(legendX + 32, legendY + 4, "start", series.name(), "")).append("</g>");
    }

    /** A marker whose shape (circle, square, triangle, diamond, repeating) tells the series apart. */
    private static String marker(int s, double x, double y, String colour) {
        return switch (s % 4) {
            case 0 -> String.format(Locale.ROOT, "<circle cx=\"%.1f\" cy=\"%.1f\" r=\"4\" fill=\"%s\"/>", x, y, colour);
            case 1 -> String.format(Locale.ROOT, "<rect x=\"%.1f\" y=\"%.1f\" width=\"8\" height=\"8\" fill=\"%s\"/>",
                    x - 4, y - 4, colour);
            case 2 -> String.format(Locale.ROOT, "<path d=\"M%.1f %.1f L%.1f %.1f L%.1f %.1f Z\" fill=\"%s\"/>",
                    x, y - 5, x + 5, y + 4, x - 5, y + 4, colour);
            default -> String.format(Locale.ROOT, "<path d=\"M%.1f %.1f L%.1f %.1f L%.1f %.1f L%.1f %.1f Z\" "
                    + "fill=\"%s\"/>", x, y - 5, x + 5, y, x, y + 5, x - 5, y, colour);
        };
    }

    private static String segment(double x1, double y1, double x2, double y2, String stroke) {
        return String.format(Locale.ROOT, "<line x1=\"%.1f\" y1=\"%.1f\" x2=\"%.1f\" y2=\"%.1f\" stroke=\"%s\"/>", x1, y1,
                x2, y2, stroke);
    }

    private static String text(double x, double y, String anchor, String content, String style) {
        return String.format(Locale.ROOT, "<text x=\"%.1f\" y=\"%.1f\" text-anchor=\"%s\" font-size=\"12\" "
                + "font-family=\"sans-serif\" fill=\"" + Html.TEXT + "\"%s>%s</text>", x, y, anchor,
                style.isEmpty() ? "" : " style=\"" + style + "\"", Html.escape(content));
    }

    private static String tick(double v) {
        if (v != 0 && Math.abs(v) < 0.01) {
            return String.format(Locale.ROOT, "%.2g", v);
        }
        return Math.abs(v) >= 100 ? String.format(Locale.ROOT, "%,.0f", v) : String.format(Locale.ROOT, "%.2f", v);
    }

    private static double x(double v, double xMin, double xMax) {
        return LEFT + (v - xMin) / (xMax - xMin) * (WIDTH - RIGHT - LEFT);
    }

    private static double y(double v, double yMax) {
        return HEIGHT - BOTTOM - v / yMax * (HEIGHT - BOTTOM - TOP);
    }
}
