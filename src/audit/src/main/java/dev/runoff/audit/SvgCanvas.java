package dev.runoff.audit;

import java.util.Locale;

/**
 * The drawing primitives the report's SVG charts share: the document, lines, text, and each arm's colour and
 * dash pattern, so that an arm looks the same in every chart.
 *
 * <p>Colours: the Okabe-Ito palette for colour-blind readers (Okabe and Ito 2008, "Color Universal Design"),
 * without its yellow, which is too light on white. The dash patterns keep series apart when printed in grey.
 */
final class SvgCanvas {

    private static final String[] COLOURS = {"#0072B2", "#D55E00", "#009E73", "#CC79A7", "#E69F00", "#56B4E9",
        "#000000"};
    private static final String[] DASHES = {"", "8 4", "2 3", "10 3 2 3", "4 4", "12 3 2 3 2 3"};

    /** The document so far. */
    final StringBuilder out = new StringBuilder(16 * 1024);

    /** Opens an SVG 1.1 document of the given size with a title and a white background. */
    SvgCanvas(int width, int height, String title) {
        out.append("<?xml version=\"1.0\" encoding=\"UTF-8\"?>\n")
                .append("<svg xmlns=\"http://www.w3.org/2000/svg\" version=\"1.1\" width=\"").append(width)
                .append("\" height=\"").append(height).append("\" viewBox=\"0 0 ").append(width).append(' ')
                .append(height).append("\" font-family=\"DejaVu Sans, Arial, Helvetica, sans-serif\" font-size=\"13\">\n");
        out.append("<title>").append(escape(title)).append("</title>\n");
        out.append("<rect width=\"100%\" height=\"100%\" fill=\"#ffffff\"/>\n");
    }

    /** Closes the document and returns it. */
    String close() {
        return out.append("</svg>\n").toString();
    }

    void line(double x1, double y1, double x2, double y2, String stroke, String dash, double width) {
        out.append(String.format(Locale.ROOT, "<line x1=\"%.1f\" y1=\"%.1f\" x2=\"%.1f\" y2=\"%.1f\" stroke=\"%s\""
                + " stroke-width=\"%s\"%s/>%n", x1, y1, x2, y2, stroke, fmt(width),
                dash.isEmpty() ? "" : " stroke-dasharray=\"" + dash + "\""));
    }

    void text(double x, double y, String anchor, int size, String weight, String content) {
        out.append(String.format(Locale.ROOT, "<text x=\"%.1f\" y=\"%.1f\" text-anchor=\"%s\" font-size=\"%d\""
                + " font-weight=\"%s\" fill=\"#000000\">%s</text>%n", x, y, anchor, size, weight, escape(content)));
    }

    /** A vertical axis title, rotated, centred on {@code y}. */
    void verticalTitle(int x, double y, String title) {
        out.append(String.format(Locale.ROOT, "<text x=\"%d\" y=\"%.1f\" text-anchor=\"middle\" font-size=\"13\""
                + " transform=\"rotate(-90 %d %.1f)\">%s</text>%n", x, y, x, y, escape(title)));
    }

    /** A legend entry: a short line in the arm's colour and dash, then the arm's name. */
    void legendEntry(int x, double y, int arm, String name) {
        out.append("<line x1=\"").append(x).append("\" y1=\"").append(fmt(y - 4)).append("\" x2=\"")
                .append(x + 36).append("\" y2=\"").append(fmt(y - 4)).append("\" stroke=\"").append(colour(arm))
                .append("\" stroke-width=\"2\"").append(dashAttribute(arm)).append("/>\n");
        text(x + 44, y, "start", 13, "normal", truncate(name));
    }

    /** 1, 2 or 5 times a power of ten, the smallest at least {@code raw}: a round tick step. */
    static double roundStep(double raw) {
        double magnitude = Math.pow(10, Math.floor(Math.log10(raw)));
        double fraction = raw / magnitude;
        return (fraction <= 1 ? 1 : fraction <= 2 ? 2 : fraction <= 5 ? 5 : 10) * magnitude;
    }

    static String colour(int arm) {
        return COLOURS[arm % COLOURS.length];
    }

    static String dashAttribute(int arm) {
        String dash = DASHES[(arm + arm / COLOURS.length) % DASHES.length];
        return dash.isEmpty() ? "" : " stroke-dasharray=\"" + dash + "\"";
    }

    static String truncate(String arm) {
        return arm.length() <= 22 ? arm : arm.substring(0, 21) + "\u2026";
    }

    static String fmt(double v) {
        return String.format(Locale.ROOT, "%.1f", v);
    }

    /** XML character escaping for text and attribute values. */
    static String escape(String text) {
        StringBuilder escaped = new StringBuilder(text.length());
        for (int i = 0; i < text.length(); i++) {
            char c = text.charAt(i);
            switch (c) {
                case '&' -> escaped.append("&amp;");
                case '<' -> escaped.append("&lt;");
                case '>' -> escaped.append("&gt;");
                case '"' -> escaped.append("&quot;");
                case '\'' -> escaped.append("&apos;");
                default -> escaped.append(c);
            }
        }
        return escaped.toString();
    }
}
