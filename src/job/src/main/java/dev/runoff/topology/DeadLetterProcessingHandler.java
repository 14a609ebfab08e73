package dev.runoff.topology;

import java.util.Map;
import org.apache.kafka.streams.errors.ErrorHandlerContext;
import org.apache.kafka.streams.errors.ProcessingExceptionHandler;
import org.apache.kafka.streams.processor.api.Record;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;

/**
 * {@code processing.exception.handler} of the job: logs the exception, sends a dead letter to the topic of
 * {@code errors.dead.letter.queue.topic.name} (the rejected topic) and lets processing continue. A failure
 * in a punctuation comes without a record: the dead letter is then keyed by the processor name with a null
 * value, reason {@code punctuation-error}; otherwise it carries the raw input, reason
 * {@code processing-error}.
 */
public final class DeadLetterProcessingHandler implements ProcessingExceptionHandler {

    private static final Logger LOG = LoggerFactory.getLogger(DeadLetterProcessingHandler.class);

    private DeadLetters deadLetters = DeadLetters.configured(Map.of());

    /** Instantiated by Kafka Streams from the configuration. */
    public DeadLetterProcessingHandler() {
        // configured by configure()
    }

    @Override
    public void configure(Map<String, ?> configs) {
        deadLetters = DeadLetters.configured(configs);
    }

    @Override
    public Response handleError(ErrorHandlerContext context, Record<?, ?> record, Exception exception) {
        if (record == null) {
            LOG.error("Punctuation failed in task {} processor {}; continuing", context.taskId(),
                    context.processorNodeId(), exception);
            return Response.resume(deadLetters.of(context, Rejections.utf8(context.processorNodeId()), null,
                    RejectReason.PUNCTUATION_ERROR, exception));
        }
        LOG.error("Processing failed in task {} processor {} at {}/{}/{}; record dead-lettered, continuing",
                context.taskId(), context.processorNodeId(), context.topic(), context.partition(), context.offset(),
                exception);
        return Response.resume(deadLetters.of(context, context.sourceRawKey(), context.sourceRawValue(),
                RejectReason.PROCESSING_ERROR, exception));
    }
}
