package dev.runoff.job;

/**
 * One configuration value and where it came from, so that a message about it can point there.
 *
 * @param key    the setting's key, e.g. {@code runoff.topic.outcomes}
 * @param value  its value, trimmed
 * @param source where it was read, e.g. {@code job.properties} or {@code environment variable RUNOFF_HTTP_PORT}
 */
public record Setting(String key, String value, String source) {
}
