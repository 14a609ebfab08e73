package dev.runoff.topology;


import java.util.Optional;
import org.apache.kafka.streams.processor.api.RecordMetadata;

/**
 * Where an input record came from, for the {@code runoff.source} header of a rejection.
 *
 * @param topic     source topic
 * @param partition source partition
 * @param offset    offset in the partition
 */
record Source(String topic, int partition, long offset) {

    /** Stand-in when no input record is being processed (a punctuation). */
    static final Source NONE = new Source("", -1, -1);

    static Source of(Optional<RecordMetadata> metadata) {
        return metadata.map(m -> new Source(m.topic(), m.partition(), m.offset())).orElse(NONE);
    }

    /** {@code topic/partition/offset}, or {@code punctuation} without a record. */
    String describe() {
        return this.equals(NONE) ? "punctuation" : topic + "/" + partition + "/" + offset;
    }

    void write(BinaryOut out) {
        out.writeString(topic).writeInt(partition).writeLong(offset);
    }

    static Source read(BinaryIn in) {
        return new Source(in.readString(), in.readInt(), in.readLong());
    }
}
