package dev.runoff.engine.best;

/** Arms ranked by their wins among joint draws, most first, ties to the lower index. */
final class Ranking {
    private Ranking() {
    }

    /** The arm with the most wins, ties to the lowest index. */
    static int leader(long[] wins) {
        return byWins(wins, 1)[0];
    }

    /** The first {@code count} arms by wins, at most all of them. */
    static int[] byWins(long[] wins, int count) {
        int n = Math.min(count, wins.length);
        int[] order = new int[n];
        boolean[] taken = new boolean[wins.length];
        for (int r = 0; r < n; r++) {
            int best = -1;
            for (int i = 0; i < wins.length; i++) {
                if (!taken[i] && (best < 0 || wins[i] > wins[best])) {
                    best = i;
                }
            }
            order[r] = best;
            taken[best] = true;
        }
        return order;
    }
}
