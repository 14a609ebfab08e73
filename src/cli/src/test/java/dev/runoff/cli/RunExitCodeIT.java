package dev.runoff.cli;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.runoff.broker.EmbeddedKafkaBroker;
import dev.runoff.testkit.Directories;
import dev.runoff.testkit.Ports;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.List;
import java.util.Map;
import java.util.concurrent.TimeUnit;
import org.apache.kafka.clients.consumer.ConsumerRecord;
import org.apache.kafka.clients.producer.KafkaProducer;
import org.apache.kafka.clients.producer.ProducerConfig;
import org.apache.kafka.clients.producer.ProducerRecord;
import org.apache.kafka.common.serialization.ByteArraySerializer;
import org.apache.kafka.streams.processor.TimestampExtractor;
import org.junit.jupiter.api.Test;

/**
 * The {@code run} command as its own JVM ends with exit code 1 when stream-thread failures exceed
 * {@code runoff.thread.replacements.max}: the orchestrator sees a failed process and restarts the pod.
 */
class RunExitCodeIT {

    @Test
    void runExitsWithCodeOneWhenThreadFailuresExceedTheReplacementLimit() throws Exception {
        Path dir = Directories.fresh("run-exit-code");
        try (EmbeddedKafkaBroker broker = EmbeddedKafkaBroker.builder(dir.resolve("kafka")).build().start()) {
            CliRun topics = CliRun.of("topics", "create", "--bootstrap-server", broker.bootstrapServers(),
                    "--partitions", "1");
            assertEquals(0, topics.exitCode(), topics.err());
            int port = Ports.free();
            Path config = Files.write(dir.resolve("run.properties"), List.of(
                    "bootstrap.servers=" + broker.bootstrapServers(), "application.id=exit-code",
                    "state.dir=" + dir.resolve("state"), "runoff.http.port=" + port,
                    "runoff.signing.required=false", "num.stream.threads=1",
                    "default.timestamp.extractor=" + PoisonTimestamps.class.getName(),
                    "runoff.thread.replacements.max=0"));
            String classpath = System.getProperty("surefire.test.class.path", System.getProperty("java.class.path"));
            Path log = dir.resolve("run.log");
            Process p = new ProcessBuilder(Path.of(System.getProperty("java.home"), "bin", "java").toString(),
                    "-cp", classpath, "-Xmx256m", Main.class.getName(), "run", "--config", config.toString())
                    .redirectErrorStream(true).redirectOutput(log.toFile()).start();
            try {
                try (KafkaProducer<byte[], byte[]> producer = new KafkaProducer<>(Map.of(
                        ProducerConfig.BOOTSTRAP_SERVERS_CONFIG, broker.bootstrapServers()),
                        new ByteArraySerializer(), new ByteArraySerializer())) {
                    producer.send(new ProducerRecord<>("runoff.outcomes", "p".getBytes(StandardCharsets.UTF_8),
                            "poison".getBytes(StandardCharsets.UTF_8))).get();
                }
                assertTrue(p.waitFor(180, TimeUnit.SECONDS), "still running: " + Files.readString(log));
                String output = Files.readString(log);
                assertEquals(1, p.exitValue(), output);
                assertTrue(output.contains("poison pill at offset 0"), output);
            } finally {
                p.destroyForcibly();
            }
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
}
