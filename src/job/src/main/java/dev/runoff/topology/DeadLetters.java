package dev.runoff.topology;

import java.util.List;
import java.util.Map;
import org.apache.kafka.clients.producer.ProducerRecord;
import org.apache.kafka.common.header.Header;
import org.apache.kafka.streams.StreamsConfig;
import org.apache.kafka.streams.errors.ErrorHandlerContext;

/**
 * Dead-letter records of the exception handlers, in the same shape as the job's own rejections: the raw
 * key and value of the input, and the {@code runoff.reason}, {@code runoff.message} and {@code runoff.source}
 * headers. Without an input record (a punctuation) the key is the processor name and the value is null.
 */
final class DeadLetters {

    private final String topic;
    private final JobCounters counters;

    private DeadLetters(String topic, JobCounters counters) {
        this.topic = topic;
        this.counters = counters;
    }

    /**
     * From the handler's configuration: the topic of {@value StreamsConfig#ERRORS_DEAD_LETTER_QUEUE_TOPIC_NAME_CONFIG}
     * (none: log only) and the counters under {@value RunoffTopology#COUNTERS_CONFIG}, if given.
     */
    static DeadLetters configured(Map<String, ?> configs) {
        Object topic = configs.get(StreamsConfig.ERRORS_DEAD_LETTER_QUEUE_TOPIC_NAME_CONFIG);
        Object counters = configs.get(RunoffTopology.COUNTERS_CONFIG);
        return new DeadLetters(topic == null ? null : topic.toString(),
                counters instanceof JobCounters c ? c : new JobCounters());
    }

    /** The records to dead-letter: none without a topic, else one. */
    List<ProducerRecord<byte[], byte[]>> of(ErrorHandlerContext context, byte[] key, byte[] value,
                                             RejectReason reason, Exception exception) {
        counters.rejected(reason.code());
        if (topic == null) {
            return List.of();
        }
        Long timestamp = context.timestamp() >= 0 ? context.timestamp() : null;
        ProducerRecord<byte[], byte[]> dead = new ProducerRecord<>(topic, null, timestamp, key, value);
        String message = exception.getClass().getName() + ": " + exception.getMessage();
        for (Header header : Rejections.headers(reason.code(), message, source(context))) {
            dead.headers().add(header);
        }
        return List.of(dead);
    }

    /**
     * The record to dead-letter for {@code refused}, a record the producer refused: its key and value cut to
     * {@code keep} bytes each, {@code message} as the message; none without a topic.
     */
    List<ProducerRecord<byte[], byte[]>> truncated(ErrorHandlerContext context, ProducerRecord<byte[], byte[]> refused,
                                                    int keep, RejectReason reason, String message) {
        counters.rejected(reason.code());
        if (topic == null) {
            return List.of();
        }
        ProducerRecord<byte[], byte[]> dead = new ProducerRecord<>(topic, null, refused.timestamp(),
                cut(refused.key(), keep), cut(refused.value(), keep));
        for (Header header : Rejections.headers(reason.code(), message, source(context))) {
            dead.headers().add(header);
        }
        return List.of(dead);
    }

    private static byte[] cut(byte[] bytes, int keep) {
        return bytes == null || bytes.length <= keep ? bytes : java.util.Arrays.copyOf(bytes, keep);
    }

    private static String source(ErrorHandlerContext context) {
        String where = context.topic() == null ? "punctuation" : context.topic() + "/" + context.partition() + "/"
                + context.offset();
        return where + " (task " + context.taskId() + ", processor " + context.processorNodeId() + ")";
    }
}
