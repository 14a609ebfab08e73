package dev.runoff.job;

import java.util.Optional;

import dev.runoff.topology.OversizeGuard;

import dev.runoff.testkit.RepositoryFiles;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.runoff.topology.TopologySettings;
import java.io.IOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.List;
import java.util.Map;
import java.util.Properties;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/** Loading, overriding and validating the job's configuration, all without a broker. */
class JobConfigTest {

    @TempDir
    Path dir;

    private Path file(String... lines) throws IOException {
        Path f = dir.resolve("job.properties");
        Files.write(f, List.of(lines));
        return f;
    }

    @Test
    void environmentVariablesOverrideTheFileWithTheDocumentedMapping() throws IOException {
        Path f = file("bootstrap.servers=file-host:9092", "runoff.topic.outcomes=from-file");
        JobConfig c = JobConfig.load(f, Map.of("RUNOFF_TOPIC_OUTCOMES", "from-env",
                "KAFKA_BOOTSTRAP_SERVERS", "env-host:9093", "KAFKA_NUM_STANDBY_REPLICAS", "2"), Map.of(), true);
        assertEquals("from-env", c.topology().outcomesTopic());
        assertEquals("env-host:9093", c.bootstrapServers());
        assertEquals("2", c.kafka().get("num.standby.replicas"));
    }

    @Test
    void kafkaVariablesThatNameNoKafkaSettingAreIgnoredAndListed() throws IOException {
        JobConfig c = JobConfig.load(file("bootstrap.servers=h:9092"),
                Map.of("KAFKA_HOME", "/opt/kafka", "KAFKA_OPTS", "-Xmx1g", "PATH", "/bin"), Map.of(), true);
        assertEquals(2, c.ignored().size(), c.ignored().toString());
        assertTrue(c.ignored().get(0).startsWith("KAFKA_HOME"), c.ignored().toString());
        assertFalse(c.kafka().containsKey("home"));
    }

    @Test
    void theEnvironmentMappingLowersAndDotsTheName() {
        assertEquals("runoff.topic.experiments.accepted", ConfigSources.keyOf("RUNOFF_TOPIC_EXPERIMENTS_ACCEPTED"));
        assertEquals("sasl.jaas.config", ConfigSources.keyOf("KAFKA_SASL_JAAS_CONFIG"));
        assertEquals("producer.compression.type", ConfigSources.keyOf("KAFKA_PRODUCER_COMPRESSION_TYPE"));
        assertNull(ConfigSources.keyOf("HOME"));
    }

    @Test
    void everyProblemIsListedOnceWithItsKeyAndSource() throws IOException {
        Path f = file(
                "bootstrap.server=h:9092",
                "num.standby.replicas=two",
                "processing.guarantee=exactly_once",
                "runoff.flush.interval.ms=0",
                "runoff.topic.outcmes=typo",
                "runoff.http.port=70000",
                "state.dir=" + dir.resolve("a-file-not-a-dir").resolve("x"));
        Files.writeString(dir.resolve("a-file-not-a-dir"), "");
        InvalidConfigException e = assertThrows(InvalidConfigException.class,
                () -> JobConfig.load(f, Map.of("RUNOFF_DEDUPE_WINDOW_MS", "soon"), Map.of(), true));
        List<String> p = e.problems();
        assertEquals(9, p.size(), String.join("\n", p));
        assertTrue(has(p, "bootstrap.server: unknown setting", "job.properties"), String.join("\n", p));
        // Kafka documentation (Kafka Streams configs): num.standby.replicas is an int
        assertTrue(has(p, "num.standby.replicas: invalid value 'two'", "expected int"), String.join("\n", p));
        // Kafka documentation: processing.guarantee is at_least_once or exactly_once_v2 in 4.x
        assertTrue(has(p, "processing.guarantee: invalid value 'exactly_once'"), String.join("\n", p));
        assertTrue(has(p, "runoff.flush.interval.ms must be >= 1, got 0"), String.join("\n", p));
        assertTrue(has(p, "unknown setting runoff.topic.outcmes", "runoff.http.port"), String.join("\n", p));
        assertTrue(has(p, "runoff.http.port must be in [0, 65535], got 70000", "job.properties"), String.join("\n", p));
        assertTrue(has(p, "runoff.dedupe.window.ms", "'soon'", "environment variable RUNOFF_DEDUPE_WINDOW_MS"),
                String.join("\n", p));
        assertTrue(has(p, "state.dir", "neither a writable directory"), String.join("\n", p));
        assertTrue(has(p, "bootstrap.servers is required"), String.join("\n", p));
    }

    @Test
    void secretValuesNeverAppearInMessages() throws IOException {
        Path f = file("bootstrap.servers=h:9092", "ssl.key.password=", "sasl.login.refresh.window.factor=hunter2");
        String secret = "s3cr3t-value";
        InvalidConfigException e = assertThrows(InvalidConfigException.class, () -> JobConfig.load(f,
                Map.of("KAFKA_SASL_JAAS_CONFIG", secret, "KAFKA_SASL_LOGIN_REFRESH_WINDOW_FACTOR", "x"), Map.of(),
                true));
        assertFalse(String.join("\n", e.problems()).contains(secret));
        JobConfig ok = JobConfig.load(file("bootstrap.servers=h:9092"), Map.of("KAFKA_SASL_JAAS_CONFIG", secret),
                Map.of(), true);
        assertTrue(KafkaKeys.isSecret("sasl.jaas.config"));
        assertEquals(secret, ok.kafka().get("sasl.jaas.config"));
    }

    @Test
    void malformedAddressesAreProblems() {
        InvalidConfigException e = assertThrows(InvalidConfigException.class, () -> JobConfig.of(Map.of(
                "bootstrap.servers", "good:9092, bad-no-port ,also:99999", "application.server", "pod-0")));
        assertEquals(3, e.problems().size(), String.join("\n", e.problems()));
        // Kafka's own validator of application.server (host:port, protocol://host:port or empty)
        assertTrue(has(e.problems(), "application.server: invalid value 'pod-0'"), e.problems().toString());
        assertTrue(JobConfig.validHostPort("[::1]:9092"));
        assertTrue(JobConfig.validHostPort("runoff-0.runoff-headless:8080"));
        assertFalse(JobConfig.validHostPort("host:0"));
    }

    @Test
    void aMissingFileIsAProblemNotAnException() {
        InvalidConfigException e = assertThrows(InvalidConfigException.class,
                () -> JobConfig.load(dir.resolve("absent.properties"), Map.of(), Map.of(), true));
        assertTrue(e.problems().get(0).contains("no such file: " + dir.resolve("absent.properties")),
                e.problems().toString());
    }

    @Test
    void aDirectoryGivenAsTheConfigFileIsReportedAsADirectory() {
        InvalidConfigException e = assertThrows(InvalidConfigException.class,
                () -> JobConfig.load(dir, Map.of(), Map.of(), true));
        assertTrue(e.problems().get(0).contains("is a directory: " + dir), e.problems().toString());
    }

    @Test
    void aMisspeltJobKeySuggestsTheKnownKey() throws Exception {
        Path file = dir.resolve("typo.properties");
        java.nio.file.Files.writeString(file, "bootstrap.servers=localhost:9092\nrunof.http.port=8080\n");
        InvalidConfigException e = assertThrows(InvalidConfigException.class,
                () -> JobConfig.load(file, Map.of(), Map.of(), true));
        assertTrue(e.problems().toString().contains("runof.http.port")
                && e.problems().toString().contains("did you mean runoff.http.port?"), e.problems().toString());
    }

    @Test
    void aMisspeltTopologyKeySuggestsTheKnownKey() {
        InvalidConfigException e = assertThrows(InvalidConfigException.class,
                () -> JobConfig.load(null, Map.of(), Map.of("bootstrap.servers", "localhost:9092",
                        "runoff.topic.outcome", "x"), true));
        assertTrue(e.problems().toString().contains("did you mean runoff.topic.outcomes?"), e.problems().toString());
    }

    @Test
    void aMisspeltKafkaKeySuggestsTheKnownKey() {
        InvalidConfigException e = assertThrows(InvalidConfigException.class,
                () -> JobConfig.load(null, Map.of(), Map.of("bootstrap.server", "localhost:9092"), false));
        assertTrue(e.problems().toString().contains("did you mean bootstrap.servers?"), e.problems().toString());
    }

    @Test
    void anUnknownKeyFarFromEveryKnownKeyGetsNoSuggestion() {
        InvalidConfigException e = assertThrows(InvalidConfigException.class,
                () -> JobConfig.load(null, Map.of(), Map.of("bootstrap.servers", "localhost:9092",
                        "completely.unrelated.thing", "1"), true));
        assertFalse(e.problems().toString().contains("did you mean"), e.problems().toString());
    }

    @Test
    void defaultsFillWhatTheFileLeavesOut() {
        JobConfig c = JobConfig.of(Map.of("bootstrap.servers", "h:9092"));
        assertEquals(JobConfig.DEFAULT_APPLICATION_ID, c.applicationId());
        assertEquals(TopologySettings.defaults(), c.topology());
        assertEquals(AppSettings.defaults(), c.app());
        Map<String, Object> streams = c.streamsOverrides();
        assertEquals(BoundedRocksDbConfig.class.getName(), streams.get("rocksdb.config.setter"));
        assertEquals(DecisionLog.class.getName() + "," + OversizeGuard.class.getName(),
                streams.get("producer.interceptor.classes"));
        assertEquals(TopologySettings.REJECTED_TOPIC, streams.get("producer." + OversizeGuard.REJECTED_KEY));
        assertEquals(SafetySettings.defaults(), c.safety());
        assertEquals("127.0.0.1", c.safety().httpBindAddress());
        assertEquals(TopologySettings.DECISIONS_TOPIC, streams.get("producer." + DecisionLog.TOPIC_KEY));
        assertEquals(AppSettings.ROCKSDB_CACHE_BYTES, streams.get(AppSettings.ROCKSDB_CACHE_KEY));
    }

    @Test
    void clientPropertiesKeepWhatEachClientKnowsAndStripItsPrefix() {
        JobConfig c = JobConfig.of(Map.of("bootstrap.servers", "h:9092", "security.protocol", "SSL",
                "num.standby.replicas", "1", "producer.compression.type", "zstd", "consumer.max.poll.records", "50"));
        Properties producer = c.clientProperties(JobConfig.Client.PRODUCER);
        assertEquals("zstd", producer.get("compression.type"));
        assertEquals("SSL", producer.get("security.protocol"));
        assertFalse(producer.containsKey("num.standby.replicas"));
        assertFalse(producer.containsKey("max.poll.records"));
        Properties consumer = c.clientProperties(JobConfig.Client.CONSUMER);
        assertEquals("50", consumer.get("max.poll.records"));
        assertFalse(consumer.containsKey("compression.type"));
        assertEquals("h:9092", c.clientProperties(JobConfig.Client.ADMIN).get("bootstrap.servers"));
    }

    @Test
    void theShippedConfigurationIsValid() {
        // deploy/runoff.properties is what the image and the ConfigMap carry
        JobConfig c = JobConfig.load(RepositoryFiles.resolve("deploy", "runoff.properties"), Map.of(), Map.of(), true);
        assertEquals("runoff", c.applicationId());
        assertEquals(8080, c.app().httpPort());
    }

    private static boolean has(List<String> problems, String... parts) {
        return problems.stream().anyMatch(p -> List.of(parts).stream().allMatch(p::contains));
    }

    @Test
    void atLeastOnceIsRefusedUnlessAcknowledged() {
        InvalidConfigException refused = assertThrows(InvalidConfigException.class, () -> JobConfig.of(Map.of(
                "bootstrap.servers", "h:9092", "processing.guarantee", "at_least_once")));
        assertTrue(refused.getMessage().contains("processing.guarantee=at_least_once")
                && refused.getMessage().contains(SafetySettings.AT_LEAST_ONCE_KEY + "=true"), refused.getMessage());
        JobConfig accepted = JobConfig.of(Map.of("bootstrap.servers", "h:9092", "processing.guarantee",
                "at_least_once", SafetySettings.AT_LEAST_ONCE_KEY, "true"));
        assertTrue(accepted.safety().atLeastOnceAccepted());
        assertEquals("at_least_once", accepted.kafka().get("processing.guarantee"));
    }

    @Test
    void theEndpointSettingsAreReadAndTheTokenIsNeverShown(@TempDir Path dir) throws IOException {
        Path tokenFile = dir.resolve("token");
        Files.writeString(tokenFile, "t0ps3cret\n");
        JobConfig c = JobConfig.of(Map.of("bootstrap.servers", "h:9092", SafetySettings.BIND_ADDRESS_KEY, "0.0.0.0",
                SafetySettings.TOKEN_FILE_KEY, tokenFile.toString(), SafetySettings.REPLACEMENTS_KEY, "5",
                SafetySettings.REPLACEMENT_WINDOW_KEY, "60000"));
        assertEquals(new SafetySettings("0.0.0.0", Optional.of("t0ps3cret"), 5, 60_000, false), c.safety());
        assertFalse(c.safety().toString().contains("t0ps3cret"), c.safety().toString());
        InvalidConfigException both = assertThrows(InvalidConfigException.class, () -> JobConfig.of(Map.of(
                "bootstrap.servers", "h:9092", SafetySettings.TOKEN_KEY, "t0ps3cret",
                SafetySettings.TOKEN_FILE_KEY, tokenFile.toString(), SafetySettings.REPLACEMENTS_KEY, "-1")));
        assertTrue(both.getMessage().contains("set one") && both.getMessage().contains(
                SafetySettings.REPLACEMENTS_KEY + " must be in [0, 1000], got -1"), both.getMessage());
        assertFalse(both.getMessage().contains("t0ps3cret"), both.getMessage());
    }
}
