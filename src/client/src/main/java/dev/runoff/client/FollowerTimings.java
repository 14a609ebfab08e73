package dev.runoff.client;

import java.time.Duration;

/**
 * Durations the follower works with.
 *
 * @param pollTimeout      longest wait of one poll
 * @param errorBackoff     pause after a failed step before trying again
 * @param partitionRefresh how often the topic's partitions are listed again, to follow added partitions
 * @param closeTimeout     longest wait for the consumer to close
 */
record FollowerTimings(Duration pollTimeout, Duration errorBackoff, Duration partitionRefresh,
                       Duration closeTimeout) {
}
