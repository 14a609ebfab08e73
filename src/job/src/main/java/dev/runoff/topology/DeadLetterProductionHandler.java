package dev.runoff.topology;

import java.util.Map;
import org.apache.kafka.clients.producer.ProducerConfig;
import org.apache.kafka.clients.producer.ProducerRecord;
import org.apache.kafka.common.errors.RecordTooLargeException;
import org.apache.kafka.streams.StreamsConfig;
import org.apache.kafka.streams.errors.ErrorHandlerContext;
import org.apache.kafka.streams.errors.ProductionExceptionHandler;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;

/**
 * {@code production.exception.handler} of the job. A record the producer or the broker refuses as too large
 * ({@link RecordTooLargeException}, e.g. a rejected input re-sent whole and larger than
 * {@code max.request.size}) cannot succeed on a retry and would fail the stream thread on every replacement.
 * Under {@code at_least_once} it is dead-lettered instead, truncated to {@link #keptBytes} bytes of key and
 * value, with reason {@code production-error} and a message naming the refused destination and both sizes,
 * and processing continues. Under exactly-once the refusal has already put the transactional producer in an
 * error state (measured: the dead letter is refused too and the thread dies), so the handler fails; there
 * {@link OversizeGuard} keeps such records from the producer before the send. Every other send error fails
 * the thread as before: an authorization or fencing error must not be swallowed, and the thread-replacement
 * limit of the job turns a repeating one into a loud stop.
 */
public final class DeadLetterProductionHandler implements ProductionExceptionHandler {

    /** Most bytes of the original key and of its value kept in a dead letter. */
    static final int MAX_KEPT_BYTES = 16 * 1024;

    private static final Logger LOG = LoggerFactory.getLogger(DeadLetterProductionHandler.class);
    private static final int DEFAULT_MAX_REQUEST_SIZE = 1_048_576;

    private DeadLetters deadLetters = DeadLetters.configured(Map.of());
    private int keptBytes = MAX_KEPT_BYTES;
    private boolean atLeastOnce;

    /** Instantiated by Kafka Streams from the configuration. */
    public DeadLetterProductionHandler() {
        // configured by configure()
    }

    @Override
    public void configure(Map<String, ?> configs) {
        deadLetters = DeadLetters.configured(configs);
        keptBytes = keptBytes(configs);
        atLeastOnce = StreamsConfig.AT_LEAST_ONCE.equals(String.valueOf(
                configs.get(StreamsConfig.PROCESSING_GUARANTEE_CONFIG)).trim());
    }

    /** At most {@link #MAX_KEPT_BYTES}, and at most a quarter of the producer's {@code max.request.size}. */
    static int keptBytes(Map<String, ?> configs) {
        Object size = configs.get(StreamsConfig.producerPrefix(ProducerConfig.MAX_REQUEST_SIZE_CONFIG));
        if (size == null) {
            size = configs.get(ProducerConfig.MAX_REQUEST_SIZE_CONFIG);
        }
        int maxRequest = size == null ? DEFAULT_MAX_REQUEST_SIZE : Integer.parseInt(size.toString().trim());
        return Math.max(0, Math.min(MAX_KEPT_BYTES, maxRequest / 4));
    }

    @Override
    public Response handleError(ErrorHandlerContext context, ProducerRecord<byte[], byte[]> record,
                                Exception exception) {
        if (!(exception instanceof RecordTooLargeException)) {
            return Response.fail();
        }
        if (!atLeastOnce) {
            LOG.error("event=record-too-large topic={}: under exactly-once the transaction is already lost; "
                    + "failing the thread", record.topic(), exception);
            return Response.fail();
        }
        int valueBytes = record.value() == null ? 0 : record.value().length;
        String message = exception.getClass().getName() + ": " + exception.getMessage() + " (record for topic "
                + record.topic() + ", key " + length(record.key()) + " bytes, value " + valueBytes
                + " bytes; the dead letter keeps the first " + keptBytes + " bytes of each)";
        LOG.error("event=record-too-large topic={} value.bytes={}; dead-lettered truncated, continuing",
                record.topic(), valueBytes, exception);
        return Response.resume(deadLetters.truncated(context, record, keptBytes, RejectReason.PRODUCTION_ERROR,
                message));
    }

    private static int length(byte[] bytes) {
        return bytes == null ? 0 : bytes.length;
    }
}
