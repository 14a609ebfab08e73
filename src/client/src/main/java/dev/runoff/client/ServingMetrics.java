package dev.runoff.client;

/**
 * Counters of an {@link AllocationTable} (and of the {@link ControlTopicFollower} that feeds it) since it was
 * created, read at one moment. Counts only grow; export them to your metrics system as monotonic counters.
 *
 * @param picks                  every call of {@link AllocationTable#pick}
 * @param unknownExperimentPicks picks answered with the default arm because the table holds no record of
 *                               the experiment
 * @param missingUnitKeyPicks    hashed picks answered with the default arm because the unit key was null
 * @param stalePicks             picks of a running experiment past its {@code validUntil}, answered by the
 *                               configured {@link StaleFallback}
 * @param stoppedPicks           picks of a STOPPED experiment
 * @param recordsApplied         control records that replaced an experiment's weights
 * @param tombstones             null values (experiment ended) applied
 * @param malformedRecords       control records skipped because they failed to decode or validate, or their
 *                               key was missing or differed from their experiment id
 * @param outdatedRecords        valid control records skipped because the table already held a record with
 *                               the same or a later (definitionVersion, sequence)
 * @param pollErrors             failed polls of the follower (it backs off and polls again)
 * @param experiments            experiments in the table now
 */
public record ServingMetrics(long picks, long unknownExperimentPicks, long missingUnitKeyPicks, long stalePicks,
                             long stoppedPicks, long recordsApplied, long tombstones, long malformedRecords,
                             long outdatedRecords, long pollErrors, int experiments) {
}
