package dev.runoff.job;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.runoff.broker.EmbeddedKafkaBroker;
import dev.runoff.testkit.Await;
import dev.runoff.testkit.Directories;
import dev.runoff.testkit.Http;
import dev.runoff.testkit.Ports;
import java.net.http.HttpResponse;
import java.nio.charset.StandardCharsets;
import java.nio.file.Path;
import java.time.Duration;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.HashMap;
import java.util.List;
import java.util.Map;
import java.util.Optional;
import org.apache.kafka.clients.admin.Admin;
import org.apache.kafka.clients.consumer.ConsumerConfig;
import org.apache.kafka.clients.consumer.ConsumerRecord;
import org.apache.kafka.clients.consumer.KafkaConsumer;
import org.apache.kafka.clients.producer.KafkaProducer;
import org.apache.kafka.clients.producer.ProducerConfig;
import org.apache.kafka.clients.producer.ProducerRecord;
import org.apache.kafka.common.header.Header;
import org.apache.kafka.common.serialization.ByteArrayDeserializer;
import org.apache.kafka.common.serialization.ByteArraySerializer;
import org.apache.kafka.streams.KafkaStreams;
import org.apache.kafka.streams.processor.TimestampExtractor;
import org.junit.jupiter.api.AfterAll;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;

/**
 * Poison pills on the real broker: an output the producer would refuse as too large is dead-lettered
 * truncated and the job goes on, and so are bytes on an internal topic that the job did not write; a record that kills the stream thread every time ends the job (DOWN with the cause,
 * failed, hence a non-zero exit of the run command) after the configured number of replacements.
 */
class ProductionFailuresIT {

    private static final Duration TIMEOUT = Duration.ofSeconds(90);
    /** Three thread failures, each followed by a rebalance. */
    private static final Duration FAILING = Duration.ofSeconds(240);
    private static EmbeddedKafkaBroker broker;
    private static Path dir;

    @BeforeAll
    static void startBroker() {
        dir = Directories.fresh("production-failures");
        broker = EmbeddedKafkaBroker.builder(dir.resolve("kafka")).build().start();
    }

    @AfterAll
    static void stopBroker() {
        broker.close();
    }

    private static JobConfig config(String app, Map<String, String> extra) {
        Map<String, String> values = new HashMap<>(Map.of("bootstrap.servers", broker.bootstrapServers(),
                "application.id", app, "state.dir", dir.resolve(app).toString(), "commit.interval.ms", "100",
                "num.stream.threads", "1", "runoff.http.port", String.valueOf(Ports.free()),
                "runoff.topic.outcomes", app + ".outcomes", "runoff.topic.rejected", app + ".rejected",
                "consumer.auto.offset.reset", "earliest"));
        values.put("runoff.signing.required", "false");
        values.put("consumer.session.timeout.ms", "6000");
        values.put("consumer.heartbeat.interval.ms", "1000");
        for (String topic : List.of("experiments", "experiments.accepted", "allocations", "decisions")) {
            values.put("runoff.topic." + topic, app + "." + topic);
        }
        values.putAll(extra);
        JobConfig config = JobConfig.of(values);
        try (Admin admin = Admin.create(config.clientProperties(JobConfig.Client.ADMIN))) {
            new TopicCreator(admin, 30_000).ensure(TopicSpec.of(config.topology()), 1, Optional.empty());
        }
        return config;
    }

    private static void send(String topic, String key, byte[] value) throws Exception {
        try (KafkaProducer<byte[], byte[]> producer = new KafkaProducer<>(Map.of(
                ProducerConfig.BOOTSTRAP_SERVERS_CONFIG, broker.bootstrapServers()),
                new ByteArraySerializer(), new ByteArraySerializer())) {
            producer.send(new ProducerRecord<>(topic, key.getBytes(StandardCharsets.UTF_8), value)).get();
        }
    }

    @Test
    void aRejectedRecordTooLargeForTheProducerIsDeadLetteredTruncatedWithItsReason() throws Exception {
        JobConfig config = config("too-large", Map.of("producer.max.request.size", "100000"));
        try (StreamsJob job = StreamsJob.start(config)) {
            Await.until("RUNNING", TIMEOUT, () -> job.state() == KafkaStreams.State.RUNNING);
            byte[] huge = new byte[300_000];
            Arrays.fill(huge, (byte) 'x');
            send("too-large.outcomes", "huge", huge);
            send("too-large.outcomes", "small", "not json".getBytes(StandardCharsets.UTF_8));
            send("too-large-by-experiment-repartition", "alien", "not written by the job".getBytes(StandardCharsets.UTF_8));
            List<ConsumerRecord<byte[], byte[]>> rejected = new ArrayList<>();
            try (KafkaConsumer<byte[], byte[]> reader = reader("too-large.rejected")) {
                Await.until("three dead letters", TIMEOUT, () -> {
                    reader.poll(Duration.ofMillis(200)).forEach(rejected::add);
                    return List.of("small", "huge", "alien").stream()
                            .allMatch(k -> rejected.stream().anyMatch(r -> k.equals(key(r))));
                });
            }
            ConsumerRecord<byte[], byte[]> dead = rejected.stream().filter(r -> "huge".equals(key(r))).findFirst()
                    .orElseThrow();
            assertEquals("production-error", header(dead, "runoff.reason"));
            assertTrue(header(dead, "runoff.message").contains("max.request.size")
                    && header(dead, "runoff.message").contains("value 300000 bytes"), header(dead, "runoff.message"));
            assertTrue(header(dead, "runoff.source").contains("too-large.outcomes"), header(dead, "runoff.source"));
            assertEquals(16 * 1024, dead.value().length, "truncated to 16 KiB (a quarter of 100000 is more)");
            ConsumerRecord<byte[], byte[]> alien = rejected.stream().filter(r -> "alien".equals(key(r))).findFirst()
                    .orElseThrow();
            assertEquals("deserialization-error", header(alien, "runoff.reason"));
            assertEquals("not written by the job", new String(alien.value(), StandardCharsets.UTF_8));
            assertEquals(KafkaStreams.State.RUNNING, job.state());
            assertEquals(200, Http.get(job.httpPort(), "/health").statusCode());
            assertEquals(0.0, replacements(job), "no thread died");
        }
    }

    @Test
    void aThreadThatKeepsFailingEndsTheJobDownWithTheCause() throws Exception {
        JobConfig config = config("poison", Map.of("default.timestamp.extractor", PoisonTimestamps.class.getName(),
                SafetySettings.REPLACEMENTS_KEY, "2"));
        try (StreamsJob job = StreamsJob.start(config)) {
            Await.until("RUNNING", TIMEOUT, () -> job.state() == KafkaStreams.State.RUNNING);
            send("poison.outcomes", "p", "poison".getBytes(StandardCharsets.UTF_8));
            assertTrue(job.awaitStop(FAILING), "the job stopped");
            assertTrue(job.failed(), "failed: the run command exits 1");
            assertTrue(job.failureCause().contains("3 times within 600000 ms")
                    && job.failureCause().contains("poison pill"), job.failureCause());
            HttpResponse<String> health = Http.get(job.httpPort(), "/health");
            assertEquals(503, health.statusCode());
            assertTrue(health.body().contains("\"status\":\"DOWN\"") && health.body().contains("poison pill"),
                    health.body());
            assertEquals(2.0, replacements(job), "two replacements before giving up");
        }
    }

    /** Throws on a record whose value is {@code poison}: the stream thread dies on it every time. */
    public static final class PoisonTimestamps implements TimestampExtractor {
        @Override
        public long extract(ConsumerRecord<Object, Object> record, long partitionTime) {
            if (record.value() instanceof byte[] value && "poison".equals(new String(value, StandardCharsets.UTF_8))) {
                throw new IllegalStateException("poison pill at offset " + record.offset());
            }
            return record.timestamp();
        }
    }

    /** The value of {@code runoff_stream_thread_replacements_total} on the job's metrics page. */
    private static double replacements(StreamsJob job) {
        String body = Http.get(job.httpPort(), "/metrics").body();
        return body.lines().filter(l -> l.startsWith("runoff_stream_thread_replacements_total"))
                .mapToDouble(l -> Double.parseDouble(l.substring(l.lastIndexOf(' ') + 1))).findFirst()
                .orElseThrow(() -> new AssertionError("no replacements counter in " + body));
    }

    private static KafkaConsumer<byte[], byte[]> reader(String topic) {
        KafkaConsumer<byte[], byte[]> consumer = new KafkaConsumer<>(Map.of(
                ConsumerConfig.BOOTSTRAP_SERVERS_CONFIG, broker.bootstrapServers(),
                ConsumerConfig.ISOLATION_LEVEL_CONFIG, "read_committed",
                ConsumerConfig.AUTO_OFFSET_RESET_CONFIG, "earliest",
                ConsumerConfig.GROUP_ID_CONFIG, topic + "-reader"), new ByteArrayDeserializer(),
                new ByteArrayDeserializer());
        consumer.subscribe(List.of(topic));
        return consumer;
    }

    private static String key(ConsumerRecord<byte[], byte[]> r) {
        return r.key() == null ? null : new String(r.key(), StandardCharsets.UTF_8);
    }

    private static String header(ConsumerRecord<byte[], byte[]> r, String name) {
        Header h = r.headers().lastHeader(name);
        return h == null ? null : new String(h.value(), StandardCharsets.UTF_8);
    }
}
