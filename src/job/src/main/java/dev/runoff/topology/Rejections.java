package dev.runoff.topology;

import dev.runoff.records.Problem;
import java.nio.charset.StandardCharsets;
import java.util.List;
import java.util.stream.Collectors;
import org.apache.kafka.common.header.Headers;
import org.apache.kafka.common.header.internals.RecordHeaders;
import org.apache.kafka.streams.processor.api.Record;

/**
 * Records for the rejected topic: the original bytes as the value, the original key, and three headers:
 * {@value #REASON_HEADER} (a reason code, see {@link RejectReason}), {@value #MESSAGE_HEADER} (what is wrong,
 * naming the field) and {@value #SOURCE_HEADER} ({@code topic/partition/offset} of the input). Each
 * rejection is counted.
 */
final class Rejections {

    /** Header holding the reason code. */
    static final String REASON_HEADER = "runoff.reason";
    /** Header holding the readable message. */
    static final String MESSAGE_HEADER = "runoff.message";
    /** Header holding the input's coordinates. */
    static final String SOURCE_HEADER = "runoff.source";
    /** Longest message kept in the header, in chars. */
    static final int MAX_MESSAGE_CHARS = 2_000;

    private final String topic;
    private final JobCounters counters;

    Rejections(String topic, JobCounters counters) {
        this.topic = topic;
        this.counters = counters;
    }

    /** A rejection to forward from a processor whose output is {@link Routed}. */
    <V> Record<byte[], Routed<V>> routed(byte[] key, byte[] value, long timestamp, String reason, String message,
                                          Source source) {
        return new Record<>(key, Routed.emit(new Emit(topic, value)), timestamp, count(reason, message, source));
    }

    /** A rejection to forward from a processor whose output is {@link Emit}. */
    Record<byte[], Emit> emit(byte[] key, byte[] value, long timestamp, String reason, String message,
                              Source source) {
        return new Record<>(key, new Emit(topic, value), timestamp, count(reason, message, source));
    }

    private Headers count(String reason, String message, Source source) {
        counters.rejected(reason);
        return headers(reason, message, source.describe());
    }

    /** The three headers. */
    static Headers headers(String reason, String message, String source) {
        RecordHeaders headers = new RecordHeaders();
        headers.add(REASON_HEADER, utf8(reason));
        headers.add(MESSAGE_HEADER, utf8(truncate(message)));
        headers.add(SOURCE_HEADER, utf8(source));
        return headers;
    }

    /** Every problem as {@code field: message}, joined by {@code "; "}. */
    static String describe(List<Problem> problems) {
        return problems.stream().map(Problem::toString).collect(Collectors.joining("; "));
    }

    static String truncate(String message) {
        return message.length() <= MAX_MESSAGE_CHARS ? message : message.substring(0, MAX_MESSAGE_CHARS) + "...";
    }

    static byte[] utf8(String text) {
        return text.getBytes(StandardCharsets.UTF_8);
    }
}
