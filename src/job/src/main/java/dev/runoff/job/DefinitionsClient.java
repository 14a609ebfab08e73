package dev.runoff.job;

import dev.runoff.records.Decoded;
import dev.runoff.records.Format;
import dev.runoff.records.RecordCodec;
import dev.runoff.records.avro.ExperimentDefinition;
import java.nio.charset.StandardCharsets;
import java.time.Duration;
import java.util.ArrayList;
import java.util.List;
import java.util.Map;
import java.util.Properties;
import java.util.concurrent.ExecutionException;
import java.util.concurrent.TimeUnit;
import java.util.concurrent.TimeoutException;
import org.apache.kafka.clients.producer.KafkaProducer;
import org.apache.kafka.clients.producer.ProducerConfig;
import org.apache.kafka.clients.producer.ProducerRecord;
import org.apache.kafka.clients.producer.RecordMetadata;
import org.apache.kafka.common.serialization.ByteArraySerializer;

/**
 * Publishes, lists and ends experiment definitions on the definitions topic (compacted, keyed by experiment
 * id), and reads the versions the job accepted from the accepted-definitions topic.
 */
public final class DefinitionsClient {

    /**
     * One experiment as listed.
     *
     * @param submitted the definition on the definitions topic
     * @param accepted  the version the job accepted for it, or {@code null} when none (yet, or it was rejected)
     */
    public record Listed(ExperimentDefinition submitted, ExperimentDefinition accepted) {
    }

    private static final RecordCodec<ExperimentDefinition> CODEC = RecordCodec.definitions();

    private final JobConfig config;
    private final Duration timeout;

    /** A client for the cluster and topics of {@code config}, waiting at most {@code timeout} per request. */
    public DefinitionsClient(JobConfig config, Duration timeout) {
        this.config = config;
        this.timeout = timeout;
    }

    /**
     * Publishes {@code definition} keyed by its id, in {@code format}. The job validates it again and
     * assigns its version.
     *
     * @return where it was written
     */
    public RecordMetadata put(ExperimentDefinition definition, Format format) {
        return send(definition.getExperimentId(), CODEC.encode(definition, format));
    }

    /** Publishes a tombstone for {@code experimentId}: the job ends the experiment. */
    public RecordMetadata end(String experimentId) {
        return send(experimentId, null);
    }

    /**
     * The current definitions (the definitions topic read to its end), each with the version the job
     * accepted; definitions that no longer decode are skipped.
     */
    public List<Listed> list() {
        Properties consumer = config.clientProperties(JobConfig.Client.CONSUMER);
        Map<String, byte[]> submitted = TopicSnapshot.read(consumer, config.topology().definitionsTopic(), timeout);
        Map<String, byte[]> accepted = TopicSnapshot.read(consumer, config.topology().acceptedDefinitionsTopic(),
                timeout);
        List<Listed> out = new ArrayList<>();
        submitted.forEach((id, bytes) -> {
            ExperimentDefinition def = decode(bytes);
            if (def != null) {
                out.add(new Listed(def, accepted.containsKey(id) ? decode(accepted.get(id)) : null));
            }
        });
        return out;
    }

    private static ExperimentDefinition decode(byte[] bytes) {
        Decoded<ExperimentDefinition> d = CODEC.decode(bytes, 0);
        return d.isValid() ? d.orThrow() : null;
    }

    private RecordMetadata send(String key, byte[] value) {
        Properties props = config.clientProperties(JobConfig.Client.PRODUCER);
        props.put(ProducerConfig.ACKS_CONFIG, "all");
        props.put(ProducerConfig.ENABLE_IDEMPOTENCE_CONFIG, "true");
        props.put(ProducerConfig.MAX_BLOCK_MS_CONFIG, String.valueOf(timeout.toMillis()));
        props.put(ProducerConfig.REQUEST_TIMEOUT_MS_CONFIG, String.valueOf(timeout.toMillis()));
        props.put(ProducerConfig.DELIVERY_TIMEOUT_MS_CONFIG, String.valueOf(timeout.toMillis() + 5_000));
        String topic = config.topology().definitionsTopic();
        try (KafkaProducer<byte[], byte[]> producer = new KafkaProducer<>(props, new ByteArraySerializer(),
                new ByteArraySerializer())) {
            return producer.send(new ProducerRecord<>(topic, key.getBytes(StandardCharsets.UTF_8), value))
                    .get(timeout.toMillis() + 10_000, TimeUnit.MILLISECONDS);
        } catch (ExecutionException e) {
            throw new IllegalStateException("could not write to topic " + topic + ": " + e.getCause().getMessage(),
                    e.getCause());
        } catch (InterruptedException e) {
            Thread.currentThread().interrupt();
            throw new IllegalStateException("interrupted while writing to topic " + topic, e);
        } catch (TimeoutException e) {
            throw new IllegalStateException("no acknowledgement from topic " + topic + " within "
                    + timeout.toMillis() + " ms", e);
        }
    }
}
