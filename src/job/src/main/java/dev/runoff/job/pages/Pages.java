package dev.runoff.job.pages;

import java.net.URLDecoder;
import java.nio.charset.StandardCharsets;
import java.util.LinkedHashMap;
import java.util.Map;

/**
 * The HTML pages of the job's HTTP endpoint, built from the decision records of a {@link DecisionHistory}:
 * {@code /} lists every experiment, {@code /experiments/{id}} shows one. The endpoint decides which requests
 * get a page; this class answers them.
 */
public final class Pages {

    /**
     * An answer.
     *
     * @param status the HTTP status
     * @param html   the whole page
     */
    public record Page(int status, String html) {
    }

    private final DecisionHistory history;
    private final String topic;

    /** Pages over {@code history}, read from the decisions topic {@code topic} (named on the pages). */
    public Pages(DecisionHistory history, String topic) {
        this.history = history;
        this.topic = topic;
    }

    /** The list of experiments; {@code rawQuery} (may be null) holds the filter, sort and refresh. */
    public Page overview(String rawQuery) {
        Map<String, String> query;
        try {
            query = parse(rawQuery);
            return new Page(200, OverviewPage.render(history, topic, OverviewPage.Options.of(query)));
        } catch (IllegalArgumentException e) {
            return error(400, "Bad request", e.getMessage());
        }
    }

    /** The page of experiment {@code id}; {@code rawQuery} may hold a refresh interval. */
    public Page experiment(String id, String rawQuery) {
        int refresh;
        try {
            refresh = OverviewPage.Options.refresh(parse(rawQuery));
        } catch (IllegalArgumentException e) {
            return error(400, "Bad request", e.getMessage());
        }
        return history.experiment(id).filter(h -> h.latest() != null)
                .map(h -> new Page(200, ExperimentPage.render(h, refresh)))
                .orElseGet(() -> error(404, "Not found", "No decision record of experiment '" + id
                        + "' has been read from topic " + topic + (history.isCaughtUp() ? "."
                        : " yet (this instance is still reading it).")));
    }

    private static Page error(int status, String title, String message) {
        return new Page(status, Html.page(title, "<h1>" + Html.escape(title) + "</h1>\n<p>" + Html.escape(message)
                + "</p>\n<p><a href=\"/\">All experiments</a></p>\n"));
    }

    /** The parameters of {@code rawQuery}; a key given twice or a malformed escape is refused. */
    static Map<String, String> parse(String rawQuery) {
        Map<String, String> out = new LinkedHashMap<>();
        if (rawQuery == null || rawQuery.isEmpty()) {
            return out;
        }
        for (String pair : rawQuery.split("&")) {
            if (pair.isEmpty()) {
                continue;
            }
            int eq = pair.indexOf('=');
            String key = decode(eq < 0 ? pair : pair.substring(0, eq));
            String value = eq < 0 ? "" : decode(pair.substring(eq + 1));
            if (out.put(key, value) != null) {
                throw new IllegalArgumentException("query parameter '" + key + "' is given twice");
            }
        }
        return out;
    }

    private static String decode(String s) {
        try {
            return URLDecoder.decode(s, StandardCharsets.UTF_8);
        } catch (IllegalArgumentException e) {
            throw new IllegalArgumentException("malformed query: a % must be followed by two hex digits of UTF-8");
        }
    }
}
