package dev.runoff.cli;

import dev.runoff.engine.planning.SimulationProgress;
import java.io.PrintWriter;
import java.util.Locale;

/**
 * A one-line progress bar, redrawn in place with a carriage return each time the finished share grows by a
 * whole percent, and ended with a line break when everything is done. Thread-safe.
 */
final class ProgressBar implements SimulationProgress {
    /** Characters of the bar at 100%. */
    static final int WIDTH = 30;

    private final PrintWriter err;
    private int shownPercent = -1;

    ProgressBar(PrintWriter err) {
        this.err = err;
    }

    @Override
    public synchronized void finished(int done, int total) {
        int percent = (int) (100L * done / total);
        if (percent == shownPercent) {
            return;
        }
        shownPercent = percent;
        int filled = WIDTH * done / total;
        err.print(String.format(Locale.ROOT, "\rsimulating [%s%s] %3d%% (%d/%d runs)", "#".repeat(filled),
                ".".repeat(WIDTH - filled), percent, done, total));
        if (done == total) {
            err.println();
        }
        err.flush();
    }
}
