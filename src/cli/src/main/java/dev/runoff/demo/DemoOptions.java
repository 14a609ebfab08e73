package dev.runoff.demo;

import dev.runoff.records.Definitions;

import java.nio.file.Path;

/**
 * Settings of one demo run.
 *
 * @param seed              seed of the traffic generator
 * @param arms              layouts in play, 2 to {@link DemoScenario#MAX_ARMS}
 * @param visitsPerPeriod   visits served per recompute period, about a third by returning visitors
 * @param periodMs          how often the job recomputes the weights (the definition's recomputePeriodMs)
 * @param delta             error probability of the stopping rule
 * @param budget            trial budget of the experiment
 * @param warmUp            trials per arm before the weights leave uniform (and before any STOP)
 * @param maxMs             the demo gives up after this many milliseconds without a STOP
 * @param httpPort          port of the job's HTTP endpoint (0: a free port)
 * @param exportDecisions   file for the decision records as JSON lines, or {@code null}
 * @param json              JSON lines on standard output instead of tables
 */
public record DemoOptions(long seed, int arms, int visitsPerPeriod, long periodMs, double delta, long budget,
                          long warmUp, long maxMs, int httpPort, Path exportDecisions, boolean json) {

    /** Checks every setting; the message names the option and the value. */
    public DemoOptions {
        if (arms < 2 || arms > DemoScenario.MAX_ARMS) {
            throw new IllegalArgumentException("--arms must be in [2, " + DemoScenario.MAX_ARMS + "], got " + arms);
        }
        positive("--visitors", visitsPerPeriod);
        if (periodMs < Definitions.MIN_RECOMPUTE_PERIOD_MS) {
            throw new IllegalArgumentException("--period-ms must be >= " + Definitions.MIN_RECOMPUTE_PERIOD_MS
                    + " (the shortest recomputePeriodMs a definition may have), got " + periodMs);
        }
        if (!(delta > 0 && delta < 1)) {
            throw new IllegalArgumentException("--delta must be in (0, 1), got " + delta);
        }
        positive("--warm-up", warmUp);
        if (budget < warmUp * arms) {
            throw new IllegalArgumentException("--budget-trials must be at least --warm-up x --arms = " + warmUp * arms
                    + ", got " + budget);
        }
        positive("--max-time-ms", maxMs);
        if (httpPort < 0 || httpPort > 65_535) {
            throw new IllegalArgumentException("--http-port must be in [0, 65535], got " + httpPort);
        }
    }

    /** The new visitors expected per period: the visits less the returning share. */
    public long newVisitorsPerPeriod() {
        return Math.max(1, Math.round(visitsPerPeriod * (1 - DemoScenario.RETURNING_SHARE)));
    }

    private static void positive(String option, long value) {
        if (value < 1) {
            throw new IllegalArgumentException(option + " must be >= 1, got " + value);
        }
    }
}
