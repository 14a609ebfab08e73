package dev.runoff.topology;

import java.util.Objects;

/**
 * A record bound for one of the job's output topics; its key and headers travel on the Kafka record.
 *
 * @param topic the destination topic
 * @param value the encoded value, or {@code null} for a tombstone
 */
record Emit(String topic, byte[] value) {

    /** Checks that the topic is present. */
    Emit {
        Objects.requireNonNull(topic, "topic");
    }
}
