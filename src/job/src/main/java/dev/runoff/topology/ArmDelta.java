package dev.runoff.topology;

import dev.runoff.engine.stats.ArmStats;

/**
 * Statistics to add to one arm of one experiment, from units first seen under one definition version.
 *
 * @param experimentId the experiment
 * @param arm          the arm
 * @param version      the definition version in force when the units counted here were first exposed (the
 *                     fold drops what predates the arm's latest addition)
 * @param stats        the statistics to merge (a delta: it may hold a success without its trial)
 * @param pending      the change of the arm's pending units (unit counting: exposed, window still open)
 */
record ArmDelta(String experimentId, String arm, long version, ArmStats stats, long pending) {

    /** {@code experimentId NUL arm NUL version}, the pre-aggregation key. */
    String key() {
        return experimentId + '\u0000' + arm + '\u0000' + version;
    }

    /** The inverse of {@link #key()} with the sums of that key. */
    static ArmDelta of(String key, ArmStats stats, long pending) {
        int first = key.indexOf('\u0000');
        int last = key.lastIndexOf('\u0000');
        return new ArmDelta(key.substring(0, first), key.substring(first + 1, last),
                Long.parseLong(key.substring(last + 1)), stats, pending);
    }
}
