package dev.runoff.topology;

import dev.runoff.engine.stats.ArmStats;

/**
 * Statistics to add to one arm of one experiment.
 *
 * @param experimentId the experiment
 * @param arm          the arm
 * @param stats        the statistics to merge (a delta: it may hold a success without its trial)
 */
record ArmDelta(String experimentId, String arm, ArmStats stats) {

    /** {@code experimentId NUL arm}, the pre-aggregation key. */
    String key() {
        return experimentId + '\u0000' + arm;
    }
}
