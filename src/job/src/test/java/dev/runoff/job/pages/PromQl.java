package dev.runoff.job.pages;

import java.util.Set;
import java.util.TreeSet;
import java.util.regex.Matcher;
import java.util.regex.Pattern;

/**
 * The metric names in a PromQL expression, for the check of the dashboard and the alert rules: label
 * matchers, grouping clauses, range selectors, strings and numbers are removed; of the identifiers left,
 * those followed by {@code (} are functions or aggregations and the keywords of the language are dropped
 * (Prometheus documentation, "Querying basics" and "Operators"; the keyword list from memory).
 */
final class PromQl {

    private static final Set<String> KEYWORDS = Set.of("by", "without", "on", "ignoring", "group_left",
            "group_right", "bool", "and", "or", "unless", "offset");
    private static final Pattern IDENTIFIER = Pattern.compile("[a-zA-Z_:][a-zA-Z0-9_:]*");

    private PromQl() {
    }

    static Set<String> metricNames(String expression) {
        String bare = expression.replaceAll("\"(?:[^\"\\\\]|\\\\.)*\"", "\"\"")
                .replaceAll("\\{[^}]*}", " ")
                .replaceAll("\\b(by|without|on|ignoring|group_left|group_right)\\s*\\([^)]*\\)", " ")
                .replaceAll("\\[[^]]*]", " ")
                .replaceAll("\\$\\w+", " ");
        Set<String> names = new TreeSet<>();
        Matcher m = IDENTIFIER.matcher(bare);
        while (m.find()) {
            String word = m.group();
            int next = m.end();
            while (next < bare.length() && Character.isWhitespace(bare.charAt(next))) {
                next++;
            }
            boolean call = next < bare.length() && bare.charAt(next) == '(';
            boolean number = m.start() > 0 && Character.isDigit(bare.charAt(m.start() - 1));
            if (!call && !number && !KEYWORDS.contains(word)) {
                names.add(word);
            }
        }
        return names;
    }
}
