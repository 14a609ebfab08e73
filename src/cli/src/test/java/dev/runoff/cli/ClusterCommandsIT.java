package dev.runoff.cli;

import dev.runoff.testkit.Await;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.runoff.job.TopicSpec;
import dev.runoff.records.Ed25519;
import dev.runoff.records.Pem;
import dev.runoff.broker.EmbeddedKafkaBroker;
import dev.runoff.topology.TopologySettings;
import java.io.IOException;
import java.net.ServerSocket;
import java.net.URI;
import java.net.http.HttpClient;
import java.net.http.HttpRequest;
import java.net.http.HttpResponse;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Duration;
import java.util.ArrayList;
import java.util.Collection;
import java.util.Comparator;
import java.util.List;
import java.util.Map;
import java.util.TreeMap;
import java.util.concurrent.TimeUnit;
import java.util.stream.Stream;
import org.apache.kafka.clients.admin.Admin;
import org.apache.kafka.clients.admin.AlterConfigOp;
import org.apache.kafka.clients.admin.Config;
import org.apache.kafka.clients.admin.ConfigEntry;
import org.apache.kafka.common.config.ConfigResource;
import org.junit.jupiter.api.AfterAll;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;

/** {@code topics create}, {@code experiment ...} and {@code run} against one embedded broker. */
class ClusterCommandsIT {

    private static final List<String> TOPICS = TopicSpec.of(TopologySettings.defaults()).stream()
            .map(TopicSpec::name).toList();
    private static Path dir;
    private static EmbeddedKafkaBroker broker;

    @BeforeAll
    static void startBroker() throws IOException {
        dir = Path.of("target", "cli-tests", "cluster").toAbsolutePath();
        if (Files.exists(dir)) {
            try (Stream<Path> paths = Files.walk(dir)) {
                for (Path p : paths.sorted(Comparator.reverseOrder()).toList()) {
                    Files.delete(p);
                }
            }
        }
        broker = EmbeddedKafkaBroker.builder(dir.resolve("kafka")).build().start();
    }

    @AfterAll
    static void stopBroker() {
        broker.close();
    }

    private static CliRun topicsCreate() {
        return CliRun.of("topics", "create", "--bootstrap-server", broker.bootstrapServers(), "--partitions", "3");
    }

    @Test
    void topicsCreateTwiceSucceedsAndTheTopicsHaveThePromisedSettings() throws Exception {
        CliRun first = topicsCreate();
        assertEquals(0, first.exitCode(), first.err());
        CliRun second = topicsCreate();
        assertEquals(0, second.exitCode(), second.err());
        assertEquals(6, second.out().lines().filter(l -> l.startsWith("unchanged")).count(), second.out());
        try (Admin admin = Admin.create(Map.of("bootstrap.servers", broker.bootstrapServers()))) {
            Map<String, Config> configs = describe(admin, TOPICS);
            // Kafka topic configs: cleanup.policy=compact keeps the last value per key
            for (String t : List.of("runoff.experiments", "runoff.experiments.accepted", "runoff.allocations")) {
                assertEquals("compact", value(configs, t, "cleanup.policy"), t);
            }
            // Kafka topic configs: retention.ms=-1 and retention.bytes=-1 mean no time or size limit
            assertEquals("delete", value(configs, "runoff.decisions", "cleanup.policy"));
            assertEquals("-1", value(configs, "runoff.decisions", "retention.ms"));
            assertEquals("-1", value(configs, "runoff.decisions", "retention.bytes"));
            assertEquals(TopicSpec.OUTCOMES_RETENTION_MS, value(configs, "runoff.outcomes", "retention.ms"));
            assertEquals(TopicSpec.REJECTED_RETENTION_MS, value(configs, "runoff.rejected", "retention.ms"));
            admin.describeTopics(TOPICS).allTopicNames().get(30, TimeUnit.SECONDS)
                    .forEach((name, d) -> assertEquals(3, d.partitions().size(), name));

            ConfigResource decisions = new ConfigResource(ConfigResource.Type.TOPIC, "runoff.decisions");
            admin.incrementalAlterConfigs(Map.of(decisions, List.of(new AlterConfigOp(
                    new ConfigEntry("retention.ms", "1000"), AlterConfigOp.OpType.SET)))).all().get(30, TimeUnit.SECONDS);
            // the change reaches the broker's metadata a moment after the controller accepted it (KRaft)
            Await.until("retention.ms 1000 visible on the broker", Duration.ofSeconds(30),
                    () -> "1000".equals(decisionsRetention(admin)));
            CliRun repair = topicsCreate();
            assertEquals(0, repair.exitCode(), repair.err());
            assertTrue(repair.out().lines().anyMatch(l -> l.startsWith("updated") && l.contains("runoff.decisions")
                    && l.contains("retention.ms: 1000 -> -1")), repair.out());
            assertEquals("-1", value(describe(admin, List.of("runoff.decisions")), "runoff.decisions", "retention.ms"));
        }
    }

    @Test
    void experimentsAreValidatedPublishedListedAndEnded() {
        assertEquals(0, topicsCreate().exitCode());
        String good = resource("checkout-buttons.json");
        CliRun valid = CliRun.of("experiment", "validate", good);
        assertEquals(0, valid.exitCode(), valid.err());
        assertTrue(valid.out().startsWith("valid: checkout-buttons: 3 arms"), valid.out());

        CliRun invalid = CliRun.of("experiment", "validate", resource("broken.json"));
        assertEquals(2, invalid.exitCode());
        assertEquals(List.of("broken.json: arms: 1 items, at least 2 required",
                "broken.json: stopping.delta: must be in (0.0, 1.0), got 2.0",
                "broken.json: invalid definition (2 problems)"), invalid.err().lines().toList());

        String bs = broker.bootstrapServers();
        CliRun put = CliRun.of("experiment", "put", good, "--bootstrap-server", bs);
        assertEquals(0, put.exitCode(), put.err());
        assertTrue(put.out().startsWith("published checkout-buttons"), put.out());
        CliRun list = CliRun.of("experiment", "list", "--bootstrap-server", bs);
        assertEquals(0, list.exitCode(), list.err());
        assertTrue(list.out().lines().anyMatch(l -> l.startsWith("checkout-buttons") && l.contains("pending")
                && l.contains("green,blue,orange")), list.out());
        CliRun end = CliRun.of("experiment", "end", "checkout-buttons", "--bootstrap-server", bs);
        assertEquals(0, end.exitCode(), end.err());
        CliRun after = CliRun.of("experiment", "list", "--bootstrap-server", bs);
        assertTrue(after.out().lines().noneMatch(l -> l.startsWith("checkout-buttons")), after.out());
        assertEquals(count(list) - 1, count(after), after.out());
    }

    @Test
    void runStopsCleanlyOnSigterm() throws Exception {
        assertEquals(0, topicsCreate().exitCode());
        int port;
        try (ServerSocket s = new ServerSocket(0)) {
            port = s.getLocalPort();
        }
        Path config = dir.resolve("run.properties");
        Path key = Files.writeString(dir.resolve("signing.pem"),
                Pem.write(Ed25519.generate("run-test", new java.security.SecureRandom()).signing()));
        Files.write(config, List.of("bootstrap.servers=" + broker.bootstrapServers(), "application.id=run-test",
                "state.dir=" + dir.resolve("run-state"), "runoff.http.port=" + port,
                "runoff.signing.key.file=" + key, "runoff.signing.key.id=run-test"));
        String classpath = System.getProperty("surefire.test.class.path", System.getProperty("java.class.path"));
        Path err = dir.resolve("run.err");
        Process p = new ProcessBuilder(Path.of(System.getProperty("java.home"), "bin", "java").toString(),
                "-cp", classpath, "-Xmx256m", Main.class.getName(), "run", "--config", config.toString())
                .redirectOutput(ProcessBuilder.Redirect.DISCARD).redirectError(err.toFile()).start();
        try {
            HttpClient http = HttpClient.newHttpClient();
            long deadline = System.nanoTime() + TimeUnit.SECONDS.toNanos(90);
            int status = 0;
            while (status != 200 && System.nanoTime() < deadline && p.isAlive()) {
                Thread.sleep(250);
                try {
                    status = http.send(HttpRequest.newBuilder(URI.create("http://127.0.0.1:" + port + "/ready"))
                            .timeout(Duration.ofSeconds(2)).build(), HttpResponse.BodyHandlers.discarding()).statusCode();
                } catch (IOException notYet) {
                    status = 0;
                }
            }
            assertEquals(200, status, "never ready: " + Files.readString(err));
            // one instance without application.server answers interactive queries from its own stores
            Path definition = dir.resolve("sigterm-test.json");
            Files.writeString(definition, Files.readString(Path.of(resource("checkout-buttons.json")))
                    .replace("checkout-buttons", "sigterm-test"));
            assertEquals(0, CliRun.of("experiment", "put", definition.toString(), "--bootstrap-server",
                    broker.bootstrapServers()).exitCode());
            int found = 0;
            while (found != 200 && System.nanoTime() < deadline) {
                Thread.sleep(250);
                found = http.send(HttpRequest.newBuilder(URI.create("http://127.0.0.1:" + port
                        + "/experiments/sigterm-test")).build(), HttpResponse.BodyHandlers.discarding()).statusCode();
            }
            assertEquals(200, found);
            assertEquals(404, http.send(HttpRequest.newBuilder(URI.create("http://127.0.0.1:" + port
                    + "/experiments/never-defined")).build(), HttpResponse.BodyHandlers.discarding()).statusCode());
            p.destroy();
            assertTrue(p.waitFor(60, TimeUnit.SECONDS), "still running 60 s after SIGTERM");
            // POSIX: a process ended by a signal reports 128 + the signal number (SIGTERM = 15)
            assertEquals(143, p.exitValue(), Files.readString(err));
            String log = Files.readString(err, StandardCharsets.UTF_8);
            assertTrue(log.contains("event=streams-state from=PENDING_SHUTDOWN to=NOT_RUNNING"), log);
            assertTrue(log.contains("event=job-stopped clean=true"), log);
        } finally {
            p.destroyForcibly();
        }
    }

    /** The N of the closing "N experiments" line of {@code experiment list}. */
    private static int count(CliRun list) {
        List<String> lines = list.out().lines().toList();
        return Integer.parseInt(lines.get(lines.size() - 1).split(" ")[0]);
    }

    private static String resource(String name) {
        return Path.of("src", "test", "resources", "definitions", name).toString();
    }

    private static String decisionsRetention(Admin admin) {
        try {
            return value(describe(admin, List.of("runoff.decisions")), "runoff.decisions", "retention.ms");
        } catch (Exception e) {
            throw new AssertionError("could not describe runoff.decisions", e);
        }
    }

    private static Map<String, Config> describe(Admin admin, Collection<String> topics) throws Exception {
        List<ConfigResource> resources = new ArrayList<>();
        topics.forEach(t -> resources.add(new ConfigResource(ConfigResource.Type.TOPIC, t)));
        Map<String, Config> out = new TreeMap<>();
        admin.describeConfigs(resources).all().get(30, TimeUnit.SECONDS).forEach((r, c) -> out.put(r.name(), c));
        return out;
    }

    private static String value(Map<String, Config> configs, String topic, String key) {
        return configs.get(topic).get(key).value();
    }
}
