package dev.runoff.cli;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertInstanceOf;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.runoff.broker.BrokerSecurity;
import dev.runoff.broker.EmbeddedKafkaBroker;
import dev.runoff.client.AllocationTable;
import dev.runoff.client.ArmAssignment;
import dev.runoff.client.ControlTopicFollower;
import dev.runoff.client.OutcomeReporter;
import dev.runoff.client.PickPolicy;
import dev.runoff.client.UnitPseudonymizer;
import dev.runoff.records.Ed25519;
import dev.runoff.records.Pem;
import dev.runoff.records.RecordCodec;
import dev.runoff.records.avro.ArmState;
import dev.runoff.records.avro.DecisionRecord;
import dev.runoff.records.avro.EventType;
import dev.runoff.testkit.Await;
import dev.runoff.testkit.Directories;
import dev.runoff.testkit.RepositoryFiles;
import dev.runoff.testkit.TestCertificates;
import java.io.IOException;
import java.io.StringReader;
import java.io.Writer;
import java.net.ServerSocket;
import java.net.URI;
import java.net.http.HttpClient;
import java.net.http.HttpRequest;
import java.net.http.HttpResponse;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.security.SecureRandom;
import java.time.Clock;
import java.time.Duration;
import java.util.ArrayList;
import java.util.Comparator;
import java.util.HashMap;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.Optional;
import java.util.Properties;
import java.util.concurrent.ExecutionException;
import java.util.concurrent.TimeUnit;
import org.apache.kafka.clients.admin.Admin;
import org.apache.kafka.clients.consumer.ConsumerRecord;
import org.apache.kafka.clients.consumer.KafkaConsumer;
import org.apache.kafka.clients.producer.KafkaProducer;
import org.apache.kafka.common.TopicPartition;
import org.apache.kafka.common.errors.SaslAuthenticationException;
import org.apache.kafka.common.errors.TimeoutException;
import org.apache.kafka.common.serialization.ByteArrayDeserializer;
import org.apache.kafka.common.serialization.ByteArraySerializer;
import org.apache.kafka.common.serialization.StringDeserializer;
import org.apache.kafka.common.serialization.StringSerializer;
import org.junit.jupiter.api.AfterAll;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;

/**
 * One embedded broker whose only client listener is SASL/SCRAM-SHA-512 over TLS: the job ({@code run} with a
 * properties file and the JAAS line in {@code KAFKA_SASL_JAAS_CONFIG}, as deploy/ passes it), the client library,
 * {@code topics create}, {@code experiment put} and {@code audit verify} work with the properties that
 * operations.md shows; a plaintext client and a wrong password are refused.
 */
class SecuredClusterIT {
    private static final String MECHANISM = "SCRAM-SHA-512";
    private static final String USER = "runoff";
    /** Distinctive secrets, so that a log line that leaks one is found. */
    private static final String PASSWORD = "job-pw-7c1e9a";
    private static final String BROKER_PASSWORD = "broker-pw-52d0b4";
    private static final String STORE_PASSWORD = "store-pw-e83f61";
    private static final String EXPERIMENT = "secured-checkout";
    private static final int UNITS = 300;
    private static final Duration WAIT = Duration.ofSeconds(90);

    private static Path dir;
    private static EmbeddedKafkaBroker broker;
    /** What operations.md shows: the client's security properties, the JAAS line included. */
    private static Map<String, String> security;
    private static Path clientConfig;
    private static Path jobConfig;

    @BeforeAll
    static void startBroker() throws IOException {
        dir = Directories.fresh("secured-cluster");
        TestCertificates certs = TestCertificates.generate(dir.resolve("certs"), STORE_PASSWORD);
        BrokerSecurity listener = BrokerSecurity.tls(certs.keyStore(), certs.password(), certs.certificate())
                .withScram(MECHANISM, "broker", BROKER_PASSWORD);
        broker = EmbeddedKafkaBroker.builder(dir.resolve("kafka")).security(listener).build().start();
        broker.addScramUser(USER, PASSWORD);
        security = listener.clientProperties(USER, PASSWORD);
        clientConfig = properties("client.properties", security);
        Map<String, String> job = new LinkedHashMap<>(security);
        job.put("bootstrap.servers", broker.bootstrapServers());
        jobConfig = properties("job.properties", job);
    }

    @AfterAll
    static void stopBroker() {
        broker.close();
    }

    @Test
    void aPlaintextClientIsRefusedWithinItsTimeoutAndAWrongPasswordIsRefusedAtOnce() throws IOException {
        long began = System.nanoTime();
        // Kafka clients (from memory): a plaintext client gets no answer from a TLS port and times out
        assertInstanceOf(TimeoutException.class, describeCluster(Map.of()));
        assertTrue(System.nanoTime() - began < TimeUnit.SECONDS.toNanos(20), "refusal took too long");

        Map<String, String> wrong = new HashMap<>(security);
        wrong.put("sasl.jaas.config", wrong.get("sasl.jaas.config").replace(PASSWORD, "not-" + PASSWORD));
        // Kafka clients report a failed SCRAM exchange as SaslAuthenticationException (from memory)
        assertInstanceOf(SaslAuthenticationException.class, describeCluster(wrong));

        CliRun plain = CliRun.of("topics", "create", "--bootstrap-server", broker.bootstrapServers(),
                "--timeout-ms", "3000");
        assertEquals(1, plain.exitCode(), plain.err());
        assertEquals(List.of("runoff topics create: no broker answered at " + broker.bootstrapServers()
                + " within 3000 ms"), plain.err().lines().toList());

        Map<String, String> wrongJob = new HashMap<>(wrong);
        wrongJob.put("bootstrap.servers", broker.bootstrapServers());
        CliRun refused = CliRun.of("experiment", "put", definition("refused").toString(), "--config",
                properties("wrong.properties", wrongJob).toString(), "--timeout-ms", "5000");
        assertEquals(1, refused.exitCode(), refused.err());
        assertEquals(1, refused.err().lines().count(), refused.err());
        assertTrue(refused.err().contains("Authentication failed"), refused.err());
        assertFalse(refused.err().contains(PASSWORD), refused.err());
    }

    @Test
    void topicsCreateAndExperimentPutTakeTheSecurityPropertiesFromTheJobConfiguration() throws IOException {
        CliRun topics = topicsCreate();
        assertEquals(0, topics.exitCode(), topics.err());
        Path def = definition("secured-put");
        CliRun put = CliRun.of("experiment", "put", def.toString(), "--config", jobConfig.toString());
        assertEquals(0, put.exitCode(), put.err());
        assertTrue(put.out().startsWith("published secured-put"), put.out());
        for (CliRun r : List.of(topics, put)) {
            assertFalse((r.out() + r.err()).contains(PASSWORD), "a command printed the password");
        }
    }

    @Test
    void theJobFoldsWhatTheClientLibraryReportsAndAuditVerifiesItsDecisions() throws Exception {
        assertEquals(0, topicsCreate().exitCode());
        int port = freePort();
        Path key = Files.writeString(dir.resolve("signing.pem"), Pem.write(
                Ed25519.generate("secured", new SecureRandom()).signing()));
        Map<String, String> run = new LinkedHashMap<>(security);
        run.remove("sasl.jaas.config");
        run.put("bootstrap.servers", broker.bootstrapServers());
        run.put("application.id", "secured-job");
        run.put("state.dir", dir.resolve("state").toString());
        run.put("runoff.http.port", Integer.toString(port));
        run.put("runoff.signing.key.file", key.toString());
        run.put("runoff.signing.key.id", "secured");
        Path err = dir.resolve("run.err");
        Process job = startJob(properties("run.properties", run), err);
        try {
            awaitReady(job, port, err);
            Path def = definition(EXPERIMENT);
            assertEquals(0, CliRun.of("experiment", "put", def.toString(), "--config", jobConfig.toString()).exitCode());
            AllocationTable table = AllocationTable.create(PickPolicy.builder("green").build(), Clock.systemUTC());
            ControlTopicFollower.Builder follow = ControlTopicFollower.builder(table, broker.bootstrapServers());
            security.forEach(follow::consumerProperty);
            try (ControlTopicFollower follower = follow.start();
                 KafkaProducer<String, byte[]> producer = producer()) {
                Await.until("weights of " + EXPERIMENT + " in the table", WAIT, () -> table.contains(EXPERIMENT));
                OutcomeReporter reporter = OutcomeReporter.builder(producer,
                        UnitPseudonymizer.withKey("a key of at least thirty-two bytes, for tests".getBytes(
                                StandardCharsets.UTF_8))).build();
                int sent = 0;
                for (int i = 0; i < UNITS; i++) {
                    ArmAssignment served = table.assign(EXPERIMENT, "unit-" + i);
                    sent += reporter.exposure(served, "exposure-" + i).isPresent() ? 1 : 0;
                    if (i % 3 == 0) {
                        reporter.outcome(served, "click-" + i, EventType.CLICK, null);
                    }
                }
                producer.flush();
                assertEquals(UNITS, sent, "every unit was served from the published weights");
            }
            DecisionRecord last = awaitDecisionCounting(UNITS);
            assertEquals(UNITS / 3, last.getArms().stream().mapToLong(a -> a.getSuccesses() == null ? 0
                    : a.getSuccesses()).sum(), last.toString());

            CliRun verify = CliRun.of("audit", "verify", "--bootstrap-server", broker.bootstrapServers(),
                    "--client-config", clientConfig.toString(), "--experiment", EXPERIMENT);
            assertEquals(0, verify.exitCode(), verify.out() + verify.err());
        } finally {
            job.destroy();
            assertTrue(job.waitFor(60, TimeUnit.SECONDS), "job still running 60 s after SIGTERM");
        }
        String log = Files.readString(err, StandardCharsets.UTF_8);
        for (String secret : List.of(PASSWORD, BROKER_PASSWORD, STORE_PASSWORD)) {
            assertFalse(log.contains(secret), "the job's log holds a secret");
        }
        // Kafka's config log lines show password-type values as [hidden] (AbstractConfig.logAll)
        assertTrue(log.contains("sasl.jaas.config = [hidden]"), "the JAAS line reached the clients, hidden");
    }

    @Test
    void theOperationsDocsShowExactlyThePropertiesThisTestConnectsWith() throws IOException {
        String docs = Files.readString(RepositoryFiles.resolve("src", "docs", "operations.md"));
        int marker = docs.indexOf("<!-- secured-client-properties -->");
        assertTrue(marker >= 0, "operations.md has no secured-client-properties block");
        int open = docs.indexOf("```\n", marker) + 4;
        Properties shown = new Properties();
        shown.load(new StringReader(docs.substring(open, docs.indexOf("```", open))));
        assertEquals(security.keySet(), shown.stringPropertyNames());
        for (String key : List.of("security.protocol", "sasl.mechanism", "ssl.truststore.type")) {
            assertEquals(security.get(key), shown.getProperty(key), key);
        }
    }

    private static CliRun topicsCreate() {
        return CliRun.of("topics", "create", "--config", jobConfig.toString(), "--partitions", "2");
    }

    private static Process startJob(Path config, Path err) throws IOException {
        String classpath = System.getProperty("surefire.test.class.path", System.getProperty("java.class.path"));
        // every logger at INFO, Kafka's configuration dumps included, so that a leaked secret would show
        Path logging = Files.writeString(dir.resolve("log4j2-info.xml"), """
                <Configuration status="WARN">
                  <Appenders><Console name="stderr" target="SYSTEM_ERR"><PatternLayout pattern="%c - %m%n"/></Console>
                  </Appenders>
                  <Loggers><Root level="INFO"><AppenderRef ref="stderr"/></Root></Loggers>
                </Configuration>
                """);
        ProcessBuilder pb = new ProcessBuilder(Path.of(System.getProperty("java.home"), "bin", "java").toString(),
                "-cp", classpath, "-Xmx256m", "-Dlog4j2.configurationFile=" + logging, Main.class.getName(), "run",
                "--config", config.toString())
                .redirectOutput(ProcessBuilder.Redirect.DISCARD).redirectError(err.toFile());
        // the secret as deploy/k8s/statefulset.yaml passes it: an environment variable from a Secret
        pb.environment().put("KAFKA_SASL_JAAS_CONFIG", security.get("sasl.jaas.config"));
        return pb.start();
    }

    private static void awaitReady(Process job, int port, Path err) throws Exception {
        HttpClient http = HttpClient.newHttpClient();
        long deadline = System.nanoTime() + WAIT.toNanos();
        int status = 0;
        while (status != 200 && System.nanoTime() < deadline && job.isAlive()) {
            Thread.sleep(250);
            try {
                status = http.send(HttpRequest.newBuilder(URI.create("http://127.0.0.1:" + port + "/ready"))
                        .timeout(Duration.ofSeconds(2)).build(), HttpResponse.BodyHandlers.discarding()).statusCode();
            } catch (IOException notYet) {
                status = 0;
            }
        }
        assertEquals(200, status, "never ready: " + Files.readString(err));
    }

    /** Reads the decisions topic until the experiment's latest record counts {@code trials} trials. */
    private static DecisionRecord awaitDecisionCounting(long trials) {
        List<DecisionRecord> seen = new ArrayList<>();
        try (KafkaConsumer<String, byte[]> consumer = new KafkaConsumer<>(consumerProps(), new StringDeserializer(),
                new ByteArrayDeserializer())) {
            consumer.assign(consumer.partitionsFor("runoff.decisions").stream()
                    .map(p -> new TopicPartition(p.topic(), p.partition())).toList());
            Await.until("a decision of " + EXPERIMENT + " counting " + trials + " trials", WAIT, () -> {
                for (ConsumerRecord<String, byte[]> r : consumer.poll(Duration.ofMillis(500))) {
                    DecisionRecord d = RecordCodec.decisionRecords().decode(r.value(), r.timestamp()).orThrow();
                    if (d.getExperimentId().equals(EXPERIMENT)) {
                        seen.add(d);
                    }
                }
                return latest(seen).map(d -> total(d) == trials).orElse(false);
            });
        }
        return latest(seen).orElseThrow();
    }

    private static Optional<DecisionRecord> latest(List<DecisionRecord> records) {
        return records.stream().max(Comparator.comparingLong(DecisionRecord::getSequence));
    }

    private static long total(DecisionRecord d) {
        return d.getArms().stream().mapToLong(ArmState::getTrials).sum();
    }

    private static Map<String, Object> consumerProps() {
        Map<String, Object> props = new HashMap<>(security);
        props.put("bootstrap.servers", broker.bootstrapServers());
        props.put("isolation.level", "read_committed");
        props.put("auto.offset.reset", "earliest");
        return props;
    }

    private static KafkaProducer<String, byte[]> producer() {
        Map<String, Object> props = new HashMap<>(security);
        props.put("bootstrap.servers", broker.bootstrapServers());
        props.put("acks", "all");
        return new KafkaProducer<>(props, new StringSerializer(), new ByteArraySerializer());
    }

    /** The cause of the failure of {@code describeCluster} with {@code client} properties and a 5 s timeout. */
    private static Throwable describeCluster(Map<String, String> client) {
        Map<String, Object> props = new HashMap<>(client);
        props.put("bootstrap.servers", broker.bootstrapServers());
        props.put("default.api.timeout.ms", 5_000);
        props.put("request.timeout.ms", 5_000);
        try (Admin admin = Admin.create(props)) {
            ExecutionException e = assertThrows(ExecutionException.class,
                    () -> admin.describeCluster().clusterId().get(30, TimeUnit.SECONDS));
            return e.getCause();
        }
    }

    /**
     * A definition counting every exposure as a trial and every click at once (EXPOSURE counting), so the test
     * need not wait for conversion windows; recomputed every second, the shortest period allowed.
     */
    private static Path definition(String id) throws IOException {
        return Files.writeString(dir.resolve(id + ".json"), """
                {
                  "experimentId": "%s",
                  "arms": ["green", "blue"],
                  "metric": {"kind": "BERNOULLI", "trialEvent": "EXPOSURE", "successEvent": "CLICK"},
                  "counting": "EXPOSURE",
                  "recomputePeriodMs": 1000,
                  "heartbeatMs": 10000,
                  "validForMs": 60000
                }
                """.formatted(id));
    }

    private static Path properties(String name, Map<String, String> values) throws IOException {
        Properties props = new Properties();
        props.putAll(values);
        Path file = dir.resolve(name);
        try (Writer out = Files.newBufferedWriter(file, StandardCharsets.UTF_8)) {
            props.store(out, null);
        }
        return file;
    }

    private static int freePort() throws IOException {
        try (ServerSocket s = new ServerSocket(0)) {
            return s.getLocalPort();
        }
    }
}
