package dev.runoff.client;

/**
 * What {@link AllocationTable#pick} does for a running experiment whose latest control record is past its
 * {@code validUntil} (the job has stopped publishing, or the follower has fallen behind). Every such pick
 * is counted in {@link ServingMetrics#stalePicks()}.
 */
public enum StaleFallback {
    /** Keep drawing from the last known weights. */
    LAST_WEIGHTS,
    /** Draw every arm of the last known record with equal probability. */
    UNIFORM,
    /** Return the policy's default arm. */
    DEFAULT_ARM
}
