package dev.runoff.topology;

import java.util.Map;
import org.apache.kafka.clients.consumer.ConsumerRecord;
import org.apache.kafka.streams.errors.DeserializationExceptionHandler;
import org.apache.kafka.streams.errors.ErrorHandlerContext;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;

/**
 * {@code deserialization.exception.handler} of the job: logs, dead-letters the raw record to the topic of
 * {@code errors.dead.letter.queue.topic.name} with reason {@code deserialization-error}, and continues. The
 * job reads its inputs as raw bytes and decodes them in its processors, so this handler fires only if an
 * internal topic holds bytes the job did not write.
 */
public final class DeadLetterDeserializationHandler implements DeserializationExceptionHandler {

    private static final Logger LOG = LoggerFactory.getLogger(DeadLetterDeserializationHandler.class);

    private DeadLetters deadLetters = DeadLetters.configured(Map.of());

    /** Instantiated by Kafka Streams from the configuration. */
    public DeadLetterDeserializationHandler() {
        // configured by configure()
    }

    @Override
    public void configure(Map<String, ?> configs) {
        deadLetters = DeadLetters.configured(configs);
    }

    @Override
    public Response handleError(ErrorHandlerContext context, ConsumerRecord<byte[], byte[]> record,
                                Exception exception) {
        LOG.error("Could not deserialize {}/{}/{}; record dead-lettered, continuing", record.topic(),
                record.partition(), record.offset(), exception);
        return Response.resume(deadLetters.of(context, record.key(), record.value(),
                RejectReason.DESERIALIZATION_ERROR, exception));
    }
}
