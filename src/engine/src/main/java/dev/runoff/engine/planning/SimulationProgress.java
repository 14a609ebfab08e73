package dev.runoff.engine.planning;

/**
 * Told each time a simulated run finishes. Called from the simulation's worker threads, possibly
 * concurrently, so implementations must be thread-safe; {@code done} counts finished runs, in no particular
 * order of replication.
 */
@FunctionalInterface
public interface SimulationProgress {

    /** Ignores progress. */
    SimulationProgress NONE = (done, total) -> {
    };

    /**
     * A run finished.
     *
     * @param done  runs finished so far, in [1, total]
     * @param total runs in the whole simulation (rule and baseline)
     */
    void finished(int done, int total);
}
