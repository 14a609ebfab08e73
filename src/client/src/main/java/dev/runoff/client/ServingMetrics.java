package dev.runoff.client;

/**
 * Counters of an {@link AllocationTable} (and of the {@link ControlTopicFollower} that feeds it) since it was
 * created, read at one moment. Counts only grow; export them to your metrics system as monotonic counters.
 *
 * @param picks                  every call of {@link AllocationTable#pick}
 * @param unknownExperimentPicks picks answered with the default arm because the table holds no record of
 *                               the experiment
 * @param missingUnitKeyPicks    hashed picks answered with the default arm because the unit key was null
 * @param stalePicks             picks of an experiment (running or STOPPED) past its {@code validUntil},
 *                               answered by the configured {@link StaleFallback}
 * @param stoppedPicks           picks of a STOPPED experiment within its {@code validUntil}
 * @param recordsApplied         control records that replaced an experiment's weights
 * @param tombstones             null values (experiment ended) applied
 * @param malformedRecords       control records skipped because they failed to decode or validate, or their
 *                               key was missing or differed from their experiment id
 * @param outdatedRecords        valid control records skipped because their sequence was not greater than
 *                               the held record's, or their definitionVersion smaller
 * @param pollErrors             failed polls of the follower (it backs off and polls again)
 * @param experiments            experiments in the table now
 * @param unverifiedRecords      control records skipped because the table verifies signatures and the record
 *                               was unsigned, signed by an untrusted key, or badly signed
 */
public record ServingMetrics(long picks, long unknownExperimentPicks, long missingUnitKeyPicks, long stalePicks,
                             long stoppedPicks, long recordsApplied, long tombstones, long malformedRecords,
                             long outdatedRecords, long pollErrors, int experiments, long unverifiedRecords) {
}
