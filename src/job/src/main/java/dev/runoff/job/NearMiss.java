package dev.runoff.job;

import java.util.Collection;
import java.util.Optional;

/**
 * "Did you mean": the known name closest to a misspelt one by edit distance (insertions, deletions,
 * substitutions and swaps of adjacent characters each cost one), when it is close enough to be a slip.
 */
public final class NearMiss {

    private NearMiss() {
    }

    /**
     * The name of {@code known} nearest to {@code given}, if it is at most {@link #limit} edits away; on a tie
     * the first in iteration order.
     */
    public static Optional<String> closest(String given, Collection<String> known) {
        String best = null;
        int bestDistance = Integer.MAX_VALUE;
        for (String k : known) {
            int d = distance(given, k);
            if (d < bestDistance && !k.equals(given)) {
                best = k;
                bestDistance = d;
            }
        }
        return best != null && bestDistance <= limit(given) ? Optional.of(best) : Optional.empty();
    }

    /** Edits allowed for a name of this length: 1 up to 4 characters, 2 up to 12, 3 beyond. */
    static int limit(String given) {
        return given.length() <= 4 ? 1 : given.length() <= 12 ? 2 : 3;
    }

    /** Optimal string alignment distance between {@code a} and {@code b}. */
    public static int distance(String a, String b) {
        int[][] d = new int[a.length() + 1][b.length() + 1];
        for (int i = 0; i <= a.length(); i++) {
            d[i][0] = i;
        }
        for (int j = 0; j <= b.length(); j++) {
            d[0][j] = j;
        }
        for (int i = 1; i <= a.length(); i++) {
            for (int j = 1; j <= b.length(); j++) {
                int cost = a.charAt(i - 1) == b.charAt(j - 1) ? 0 : 1;
                int v = Math.min(Math.min(d[i - 1][j] + 1, d[i][j - 1] + 1), d[i - 1][j - 1] + cost);
                if (i > 1 && j > 1 && a.charAt(i - 1) == b.charAt(j - 2) && a.charAt(i - 2) == b.charAt(j - 1)) {
                    v = Math.min(v, d[i - 2][j - 2] + 1);
                }
                d[i][j] = v;
            }
        }
        return d[a.length()][b.length()];
    }
}
