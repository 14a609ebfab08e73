package dev.runoff.job.pages;

import java.util.Locale;

/**
 * Escaping and the frame shared by the pages: one style sheet inside the page, no script, no font or image
 * from anywhere else. Every string that comes from a definition or a record (experiment ids, arm names,
 * reasons) goes through {@link #escape(String)} before it reaches HTML or SVG.
 */
final class Html {

    /** Colour of text (on white); WCAG 2.1 success criterion 1.4.3 asks 4.5:1 of body text. */
    static final String TEXT = "#1a1a1a";
    /** Colour of links. */
    static final String LINK = "#0b4f8a";
    /** Colour of notes. */
    static final String NOTE = "#444444";
    /** Background. */
    static final String BACKGROUND = "#ffffff";

    private static final String STYLE = """
            body{font-family:system-ui,sans-serif;color:%s;background:%s;margin:1.5rem;max-width:70rem}
            a{color:%s}
            table{border-collapse:collapse;margin:0.5rem 0 1.5rem}
            th,td{border:1px solid #888;padding:0.25rem 0.5rem;text-align:left}
            td.n{text-align:right;font-variant-numeric:tabular-nums}
            caption{text-align:left;font-weight:bold;padding:0.25rem 0}
            .note{color:%s}
            form{margin:0.5rem 0}
            svg{display:block;margin:0.5rem 0 1.5rem}
            """.formatted(TEXT, BACKGROUND, LINK, NOTE);

    private Html() {
    }

    /** {@code s} with {@code & < > " '} replaced by entities: safe in HTML text, attributes and SVG. */
    static String escape(String s) {
        if (s == null) {
            return "";
        }
        StringBuilder b = new StringBuilder(s.length() + 16);
        for (int i = 0; i < s.length(); i++) {
            char c = s.charAt(i);
            switch (c) {
                case '&' -> b.append("&amp;");
                case '<' -> b.append("&lt;");
                case '>' -> b.append("&gt;");
                case '"' -> b.append("&quot;");
                case '\'' -> b.append("&#39;");
                default -> b.append(c);
            }
        }
        return b.toString();
    }

    /** {@link #page(String, String, int)} without reloading. */
    static String page(String title, String body) {
        return page(title, body, 0);
    }

    /**
     * A whole page with {@code title} (escaped here) and {@code body} (already HTML) that the browser reloads
     * every {@code refreshSeconds} (0: never), by a meta refresh rather than a script.
     */
    static String page(String title, String body, int refreshSeconds) {
        return "<!DOCTYPE html>\n<html lang=\"en\"><head><meta charset=\"utf-8\">"
                + "<meta name=\"viewport\" content=\"width=device-width, initial-scale=1\">"
                + (refreshSeconds > 0 ? "<meta http-equiv=\"refresh\" content=\"" + refreshSeconds + "\">" : "")
                + "<title>" + escape(title) + "</title><style>" + STYLE + "</style></head>\n<body>\n" + body
                + "</body></html>\n";
    }

    /** {@code value} with {@code digits} decimals, or an en dash when it is null or not finite. */
    static String number(Double value, int digits) {
        return value == null || !Double.isFinite(value) ? "\u2013"
                : String.format(Locale.ROOT, "%." + digits + "f", value);
    }

    /** A time in ms since the epoch as UTC to the second, e.g. {@code 2026-12-02T10:00:00Z}. */
    static String time(long millis) {
        return java.time.Instant.ofEpochMilli(millis).truncatedTo(java.time.temporal.ChronoUnit.SECONDS).toString();
    }

    /** {@code value} with thousands separators. */
    static String whole(long value) {
        return String.format(Locale.ROOT, "%,d", value);
    }
}
