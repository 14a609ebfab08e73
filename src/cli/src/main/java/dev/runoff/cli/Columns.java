package dev.runoff.cli;

import java.util.ArrayList;
import java.util.List;

/** Rows of text cells printed as aligned columns: the first left-aligned, the others right-aligned. */
final class Columns {
    private final List<String[]> rows = new ArrayList<>();

    /** Adds a row; every row must have the same number of cells. */
    Columns row(String... cells) {
        if (!rows.isEmpty() && cells.length != rows.get(0).length) {
            throw new IllegalArgumentException("row has " + cells.length + " cells, expected " + rows.get(0).length);
        }
        rows.add(cells.clone());
        return this;
    }

    /** The rows, each on its own line, cells separated by at least two spaces, without trailing blanks. */
    String render() {
        if (rows.isEmpty()) {
            return "";
        }
        int[] width = new int[rows.get(0).length];
        for (String[] r : rows) {
            for (int c = 0; c < r.length; c++) {
                width[c] = Math.max(width[c], r[c].length());
            }
        }
        StringBuilder out = new StringBuilder();
        for (String[] r : rows) {
            StringBuilder line = new StringBuilder(r[0]).append(" ".repeat(width[0] - r[0].length()));
            for (int c = 1; c < r.length; c++) {
                line.append("  ").append(" ".repeat(width[c] - r[c].length())).append(r[c]);
            }
            out.append(line.toString().stripTrailing()).append(System.lineSeparator());
        }
        return out.toString();
    }
}
