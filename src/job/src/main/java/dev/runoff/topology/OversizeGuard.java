package dev.runoff.topology;

import java.util.Arrays;
import java.util.List;
import java.util.Map;
import java.util.Set;
import org.apache.kafka.clients.producer.ProducerConfig;
import org.apache.kafka.clients.producer.ProducerInterceptor;
import org.apache.kafka.clients.producer.ProducerRecord;
import org.apache.kafka.clients.producer.RecordMetadata;
import org.apache.kafka.common.header.Header;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;

/**
 * A producer interceptor on the Kafka Streams producers that keeps records the producer would refuse as too
 * large away from it. Under exactly-once a {@code RecordTooLargeException} from {@code send} puts the
 * transactional producer in an error state: the transaction aborts, the stream thread dies, and its
 * replacement fails on the same record again (measured on the in-JVM broker, see ProductionFailuresIT). No
 * exception handler can skip such a record, so this guard acts before the send.
 *
 * <p>A record for one of the job's output topics ({@value #OUTPUTS_KEY}) whose estimated size exceeds
 * {@code max.request.size} less {@value #MARGIN_BYTES} bytes is replaced by a dead letter for the rejected
 * topic ({@value #REJECTED_KEY}): the first {@link DeadLetterProductionHandler#MAX_KEPT_BYTES} bytes (at most
 * a quarter of {@code max.request.size}) of its key and value, reason {@code production-error}, and a message
 * naming the destination and both sizes. Records of internal topics (changelogs, repartitions) pass
 * unchanged: losing one would lose state, so the job fails loudly instead.
 */
public final class OversizeGuard implements ProducerInterceptor<byte[], byte[]> {

    /** Producer configuration key (with the {@code producer.} prefix) naming the rejected topic. */
    public static final String REJECTED_KEY = "runoff.oversize.rejected.topic";
    /** Producer configuration key (with the {@code producer.} prefix): the output topics, comma-separated. */
    public static final String OUTPUTS_KEY = "runoff.oversize.output.topics";
    /** Room left for the record batch and record overhead, in bytes (common practice: a generous margin). */
    static final int MARGIN_BYTES = 4_096;

    private static final Logger LOG = LoggerFactory.getLogger(OversizeGuard.class);
    private static final int DEFAULT_MAX_REQUEST_SIZE = 1_048_576;

    private String rejected;
    private Set<String> outputs = Set.of();
    private long limit = DEFAULT_MAX_REQUEST_SIZE - MARGIN_BYTES;
    private int kept = DeadLetterProductionHandler.MAX_KEPT_BYTES;
    private JobCounters counters = new JobCounters();

    /** Kafka instantiates the interceptor reflectively. */
    public OversizeGuard() {
        // configured by configure(...)
    }

    @Override
    public void configure(Map<String, ?> configs) {
        Object topic = configs.get(REJECTED_KEY);
        rejected = topic == null ? null : topic.toString();
        Object list = configs.get(OUTPUTS_KEY);
        outputs = list == null ? Set.of() : Set.copyOf(Arrays.asList(list.toString().split(",")));
        Object size = configs.get(ProducerConfig.MAX_REQUEST_SIZE_CONFIG);
        int maxRequest = size == null ? DEFAULT_MAX_REQUEST_SIZE : Integer.parseInt(size.toString().trim());
        limit = (long) maxRequest - MARGIN_BYTES;
        kept = DeadLetterProductionHandler.keptBytes(Map.of(ProducerConfig.MAX_REQUEST_SIZE_CONFIG, maxRequest));
        if (configs.get(RunoffTopology.COUNTERS_CONFIG) instanceof JobCounters c) {
            counters = c;
        }
    }

    @Override
    public ProducerRecord<byte[], byte[]> onSend(ProducerRecord<byte[], byte[]> record) {
        if (rejected == null || !outputs.contains(record.topic())) {
            return record;
        }
        long size = size(record);
        if (size <= limit) {
            return record;
        }
        String message = "record of about " + size + " bytes for topic " + record.topic() + " exceeds "
                + "max.request.size less " + MARGIN_BYTES + " bytes (" + limit + "); the producer would refuse it "
                + "(RecordTooLargeException) and abort the transaction; key " + length(record.key()) + " bytes, value "
                + length(record.value()) + " bytes, the dead letter keeps the first " + kept + " bytes of each";
        LOG.error("event=record-too-large topic={} bytes={} limit={}: dead-lettered truncated to {}", record.topic(),
                size, limit, rejected);
        counters.rejected(RejectReason.PRODUCTION_ERROR.code());
        ProducerRecord<byte[], byte[]> dead = new ProducerRecord<>(rejected, null, record.timestamp(),
                cut(record.key()), cut(record.value()));
        String source = header(record, Rejections.SOURCE_HEADER);
        for (Header header : Rejections.headers(RejectReason.PRODUCTION_ERROR.code(), message,
                source == null ? "output to " + record.topic() : source)) {
            dead.headers().add(header);
        }
        return dead;
    }

    /** Bytes of key, value and headers: a lower bound of the serialized size. */
    static long size(ProducerRecord<byte[], byte[]> record) {
        long size = length(record.key()) + length(record.value());
        for (Header h : record.headers()) {
            size += h.key().length() + length(h.value());
        }
        return size;
    }

    private byte[] cut(byte[] bytes) {
        return bytes == null || bytes.length <= kept ? bytes : Arrays.copyOf(bytes, kept);
    }

    private static String header(ProducerRecord<byte[], byte[]> record, String name) {
        Header h = record.headers().lastHeader(name);
        return h == null || h.value() == null ? null : new String(h.value(), java.nio.charset.StandardCharsets.UTF_8);
    }

    private static int length(byte[] bytes) {
        return bytes == null ? 0 : bytes.length;
    }

    /** The output topics of {@code settings} as the value of {@link #OUTPUTS_KEY}. */
    public static String outputs(TopologySettings settings) {
        return String.join(",", List.of(settings.acceptedDefinitionsTopic(), settings.allocationsTopic(),
                settings.decisionsTopic(), settings.rejectedTopic()));
    }

    @Override
    public void onAcknowledgement(RecordMetadata metadata, Exception exception) {
        // nothing to do
    }

    @Override
    public void close() {
        // no resources
    }
}
