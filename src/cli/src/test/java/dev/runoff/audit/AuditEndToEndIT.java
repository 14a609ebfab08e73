package dev.runoff.audit;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import com.fasterxml.jackson.databind.ObjectMapper;
import dev.runoff.broker.EmbeddedKafkaBroker;
import dev.runoff.cli.Main;
import dev.runoff.records.CanonicalJson;
import dev.runoff.records.HashChain;
import dev.runoff.records.RecordCodec;
import dev.runoff.records.avro.ArmState;
import dev.runoff.records.avro.Decision;
import dev.runoff.records.avro.DecisionRecord;
import dev.runoff.records.avro.CountingMode;
import dev.runoff.records.avro.ExperimentDefinition;
import dev.runoff.topology.JobCounters;
import dev.runoff.topology.RunoffTopology;
import dev.runoff.topology.TopologySettings;
import java.io.IOException;
import java.io.PrintWriter;
import java.io.StringWriter;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Clock;
import java.time.Duration;
import java.util.ArrayList;
import java.util.Collections;
import java.util.Comparator;
import java.util.List;
import java.util.Map;
import java.util.Properties;
import java.util.stream.Stream;
import org.apache.commons.rng.UniformRandomProvider;
import org.apache.commons.rng.simple.RandomSource;
import org.apache.kafka.clients.consumer.ConsumerConfig;
import org.apache.kafka.clients.consumer.ConsumerRecord;
import org.apache.kafka.clients.consumer.KafkaConsumer;
import org.apache.kafka.clients.producer.KafkaProducer;
import org.apache.kafka.clients.producer.ProducerConfig;
import org.apache.kafka.clients.producer.ProducerRecord;
import org.apache.kafka.common.TopicPartition;
import org.apache.kafka.common.serialization.ByteArrayDeserializer;
import org.apache.kafka.common.serialization.ByteArraySerializer;
import org.apache.kafka.streams.KafkaStreams;
import org.apache.kafka.streams.StreamsConfig;
import org.junit.jupiter.api.AfterAll;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;

/**
 * The real job on an embedded broker decides an experiment while a simulated serving tier follows its weights;
 * then {@code runoff audit verify} passes on the decisions topic and on an export of it, fails on each kind of
 * tampering with the right record named, and {@code runoff audit report} draws the experiment.
 */
class AuditEndToEndIT {

    private static final Path DIR = Path.of("target", "audit-e2e");
    private static final String EXPERIMENT = "checkout-button";
    private static final List<String> ARMS = List.of("control", "green", "blue");
    private static final double[] CLICK_RATES = {0.04, 0.06, 0.20};
    private static final int UNITS_PER_ROUND = 300;
    private static final int MAX_ROUNDS = 12;
    private static final Duration WAIT = Duration.ofSeconds(60);
    /**
     * Recompute period of the experiment. A decision may count part of a round when the job folds it across a
     * recompute (a loaded machine): each round is still drawn from the weights of a decision that counted every
     * earlier round, and the sample-ratio check accepts any mix of the weight vectors still valid in a period.
     */
    private static final long RECOMPUTE_MS = 4_000;
    private static final TopologySettings SETTINGS = TopologySettings.fromMap(Map.of(
            TopologySettings.FLUSH_INTERVAL_KEY, 100, TopologySettings.ALLOCATE_INTERVAL_KEY, 100));

    private static EmbeddedKafkaBroker broker;
    private static KafkaStreams streams;
    private static List<DecisionRecord> decisions;
    private static Path export;

    @BeforeAll
    static void runJob() throws Exception {
        deleteRecursively(DIR);
        Files.createDirectories(DIR);
        broker = EmbeddedKafkaBroker.builder(DIR.resolve("broker")).build().start();
        for (String topic : List.of(SETTINGS.outcomesTopic(), SETTINGS.definitionsTopic(),
                SETTINGS.acceptedDefinitionsTopic(), SETTINGS.allocationsTopic(), SETTINGS.decisionsTopic(),
                SETTINGS.rejectedTopic())) {
            broker.createTopic(topic, 1, Map.of());
        }
        startJob();
        decisions = serveUntilStop();
        export = exportTopic(DIR.resolve("decisions.jsonl"));
    }

    @AfterAll
    static void stopJob() {
        if (streams != null) {
            streams.close(Duration.ofSeconds(30));
        }
        if (broker != null) {
            broker.close();
        }
    }

    @Test
    void verifyPassesOnTheTopic() {
        Run run = cli("audit", "verify", "--bootstrap-server", broker.bootstrapServers(), "--topic",
                SETTINGS.decisionsTopic());
        assertEquals(0, run.exit, run.out + run.err);
        assertTrue(run.out.contains("Experiment " + EXPERIMENT + ": VERIFIED"), run.out);
        assertTrue(run.out.contains("records checked: " + decisions.size() + ", reproduced bit for bit: "
                + decisions.size()), run.out);
    }

    @Test
    void verifyPassesOnAnExportAndSaysSoInJson() throws Exception {
        Run run = cli("audit", "verify", "--file", export.toString(), "--json");
        assertEquals(0, run.exit, run.out + run.err);
        var json = new ObjectMapper().readTree(run.out);
        assertTrue(json.get("verified").asBoolean());
        assertEquals(decisions.size(), json.get("experiments").get(0).get("reproduced").asInt());
        Files.writeString(DIR.resolve("verify.txt"), cli("audit", "verify", "--file", export.toString()).out);
    }

    @Test
    void alteredFieldFailsAtThatRecord() throws IOException {
        List<String> lines = Files.readAllLines(export);
        DecisionRecord third = decisions.get(2);
        lines.set(2, lines.get(2).replace("\"streamTime\":" + third.getStreamTime(),
                "\"streamTime\":" + (third.getStreamTime() + 1)));
        assertFails(lines, "sequence 3 (line 3): chain: hash");
    }

    @Test
    void deletedRecordFailsAtTheRecordAfterIt() throws IOException {
        List<String> lines = new ArrayList<>(Files.readAllLines(export));
        lines.remove(2);
        assertFails(lines, "sequence 4 (line 3): chain: previousHash");
    }

    @Test
    void reorderedRecordsFailAtTheFirstOfThem() throws IOException {
        List<String> lines = new ArrayList<>(Files.readAllLines(export));
        Collections.swap(lines, 2, 3);
        assertFails(lines, "sequence 4 (line 3): chain: previousHash");
    }

    @Test
    void changedCountFailsRecomputationEvenWithARebuiltChain() throws IOException {
        List<DecisionRecord> forged = new ArrayList<>(decisions);
        DecisionRecord third = forged.get(2);
        List<ArmState> arms = new ArrayList<>(third.getArms());
        arms.set(2, ArmState.newBuilder(arms.get(2)).setTrials(arms.get(2).getTrials() + 5).build());
        forged.set(2, DecisionRecord.newBuilder(third).setArms(arms).build());
        forged = HashChain.chain(forged);
        assertFails(forged.stream().map(CanonicalJson::of).toList(), "sequence 3 (line 3): recomputation: arms[");
    }

    @Test
    void reportWritesTheTimelineTheEvidenceAndTheCharts() throws Exception {
        Path svg = DIR.resolve("checkout-button.svg");
        Path evidenceSvg = DIR.resolve("checkout-button-evidence.svg");
        Run run = cli("audit", "report", "--file", export.toString(), "--experiment", EXPERIMENT, "--svg",
                svg.toString(), "--evidence-svg", evidenceSvg.toString());
        assertEquals(0, run.exit, run.err);
        String[] parts = run.out.split("\n\nEvidence against the losing arms at decision ");
        assertEquals(2, parts.length, run.out);
        assertEquals(decisions.size() + 2, parts[0].split("\n").length, run.out);
        String[] evidenceLines = parts[1].split("\n");
        assertTrue(evidenceLines[evidenceLines.length - 1].startsWith("Rates "), run.out);
        Files.writeString(DIR.resolve("report.txt"), run.out);
        var document = ReportTest.parse(Files.readString(svg));
        assertEquals("svg", document.getDocumentElement().getLocalName());
        assertEquals("svg", ReportTest.parse(Files.readString(evidenceSvg)).getDocumentElement().getLocalName());
        Path config = Files.writeString(DIR.resolve("client.properties"), "bootstrap.servers="
                + broker.bootstrapServers() + "\nclient.id=auditor\n");
        Run csv = cli("audit", "report", "--client-config", config.toString(), "--format", "csv");
        assertEquals(0, csv.exit, csv.err);
        assertEquals(decisions.size() + 1, csv.out.split("\r\n").length);
    }

    @Test
    void badArgumentsExitWithTwo() {
        assertEquals(2, cli("audit", "verify").exit);
        assertEquals(2, cli("audit", "verify", "--file", export.toString(), "--bootstrap-server", "x:1").exit);
        assertEquals(2, cli("audit", "verify", "--file", export.toString(), "--alpha", "2").exit);
        assertEquals(2, cli("audit", "verify", "--file", DIR.resolve("absent.jsonl").toString()).exit);
        assertEquals(2, cli("audit", "report", "--file", export.toString(), "--format", "xml").exit);
        assertEquals(2, cli("audit", "report", "--file", export.toString(), "--experiment", "nope").exit);
    }

    private static void assertFails(List<String> lines, String firstFailure) throws IOException {
        Path file = Files.write(DIR.resolve("tampered.jsonl"), lines, StandardCharsets.UTF_8);
        Run run = cli("audit", "verify", "--file", file.toString());
        assertEquals(1, run.exit, run.out + run.err);
        assertTrue(run.out.contains("first failure: " + firstFailure), run.out);
    }

    private record Run(int exit, String out, String err) {
    }

    private static Run cli(String... args) {
        StringWriter out = new StringWriter();
        StringWriter err = new StringWriter();
        int exit = Main.commandLine().setOut(new PrintWriter(out)).setErr(new PrintWriter(err)).execute(args);
        return new Run(exit, out.toString(), err.toString());
    }

    private static void startJob() throws InterruptedException {
        JobCounters counters = new JobCounters();
        Properties props = RunoffTopology.streamsConfig(SETTINGS, counters, Map.of(
                StreamsConfig.APPLICATION_ID_CONFIG, "audit-e2e",
                StreamsConfig.BOOTSTRAP_SERVERS_CONFIG, broker.bootstrapServers(),
                StreamsConfig.STATE_DIR_CONFIG, DIR.resolve("state").toAbsolutePath().toString()));
        streams = new KafkaStreams(RunoffTopology.build(SETTINGS, props, counters), props);
        streams.start();
        for (int i = 0; i < WAIT.toMillis() / 100 && streams.state() != KafkaStreams.State.RUNNING; i++) {
            Thread.sleep(100);
        }
        assertEquals(KafkaStreams.State.RUNNING, streams.state());
    }

    /**
     * Defines the experiment, then each round serves units with arms drawn from the weights of the latest
     * decision (clicks from fixed rates) and waits for the decision that counts them all, until a STOP.
     */
    private static List<DecisionRecord> serveUntilStop() {
        ExperimentDefinition def = SimulatedJob.definition(EXPERIMENT, ARMS, 0);
        def.setVersion(0);
        // Per-exposure counting: each round must be counted by the next decision (see awaitDecisionWithTrials);
        // with unit counting a round would be counted only once its units' windows have closed.
        def.setCounting(CountingMode.EXPOSURE);
        def.setRecomputePeriodMs(RECOMPUTE_MS);
        def.setHeartbeatMs(30_000);
        def.setValidForMs(60_000);
        UniformRandomProvider rng = RandomSource.SPLIT_MIX_64.create(2024);
        Clock clock = Clock.systemUTC();
        List<DecisionRecord> seen = new ArrayList<>();
        try (KafkaProducer<byte[], byte[]> producer = producer(); KafkaConsumer<byte[], byte[]> consumer = consumer()) {
            producer.send(new ProducerRecord<>(SETTINGS.definitionsTopic(), utf8(EXPERIMENT),
                    RecordCodec.definitions().encode(def)));
            producer.flush();
            awaitDecisionWithTrials(consumer, seen, 0);
            long sent = 0;
            for (int round = 0; round < MAX_ROUNDS && last(seen).getDecision() != Decision.STOP; round++) {
                double[] weights = last(seen).getArms().stream().mapToDouble(ArmState::getWeight).toArray();
                for (int u = 0; u < UNITS_PER_ROUND; u++) {
                    String unit = "r" + round + "u" + u;
                    int arm = SimulatedJob.pick(rng.nextDouble(), weights);
                    long now = clock.millis();
                    producer.send(event(unit, "EXPOSURE", ARMS.get(arm), now));
                    if (rng.nextDouble() < CLICK_RATES[arm]) {
                        producer.send(event(unit, "CLICK", null, now));
                    }
                }
                producer.flush();
                sent += UNITS_PER_ROUND;
                awaitDecisionWithTrials(consumer, seen, sent);
            }
        }
        assertTrue(seen.size() >= 4, "enough decisions: " + seen.size());
        return seen;
    }

    /**
     * Reads decisions until one counts {@code trials} trials in all (or a STOP comes): every decision read counts
     * no fewer trials than the one before and no more than were sent; one may count part of a round, when the
     * job folded the round across a recompute.
     */
    private static void awaitDecisionWithTrials(KafkaConsumer<byte[], byte[]> consumer, List<DecisionRecord> seen,
                                                long trials) {
        for (int i = 0; i < WAIT.toMillis() / 200; i++) {
            for (ConsumerRecord<byte[], byte[]> r : consumer.poll(Duration.ofMillis(200))) {
                DecisionRecord d = RecordCodec.decisionRecords().decode(r.value(), 0).orThrow();
                long counted = counted(d);
                assertTrue(counted <= trials && (seen.isEmpty() || counted >= counted(last(seen))), "decision "
                        + d.getSequence() + " counted " + counted + " trials; sent " + trials);
                seen.add(d);
            }
            if (!seen.isEmpty() && (counted(last(seen)) == trials || last(seen).getDecision() == Decision.STOP)) {
                return;
            }
        }
        throw new AssertionError("no decision counting " + trials + " trials within " + WAIT + "; seen " + seen.size());
    }

    private static long counted(DecisionRecord d) {
        return d.getArms().stream().mapToLong(ArmState::getTrials).sum();
    }

    private static Path exportTopic(Path file) throws IOException {
        Map<String, String> client = Map.of(ConsumerConfig.BOOTSTRAP_SERVERS_CONFIG, broker.bootstrapServers());
        List<Entry> entries = new TopicSource(client, SETTINGS.decisionsTopic(), WAIT, new EntryDecoder(0))
                .read(EXPERIMENT);
        List<String> lines = entries.stream().map(e -> CanonicalJson.of(e.record())).toList();
        return Files.write(file, lines, StandardCharsets.UTF_8);
    }

    private static ProducerRecord<byte[], byte[]> event(String unit, String type, String arm, long time) {
        String json = "{\"experimentId\":\"" + EXPERIMENT + "\",\"unitId\":\"" + unit + "\",\"eventId\":\"" + unit
                + "-" + type + "\",\"type\":\"" + type + "\",\"timestamp\":" + time
                + (arm == null ? "" : ",\"arm\":\"" + arm + "\"") + "}";
        return new ProducerRecord<>(SETTINGS.outcomesTopic(), utf8(unit), utf8(json));
    }

    private static DecisionRecord last(List<DecisionRecord> records) {
        return records.get(records.size() - 1);
    }

    private static byte[] utf8(String text) {
        return text.getBytes(StandardCharsets.UTF_8);
    }

    private static KafkaProducer<byte[], byte[]> producer() {
        Properties props = new Properties();
        props.put(ProducerConfig.BOOTSTRAP_SERVERS_CONFIG, broker.bootstrapServers());
        return new KafkaProducer<>(props, new ByteArraySerializer(), new ByteArraySerializer());
    }

    private static KafkaConsumer<byte[], byte[]> consumer() {
        Properties props = new Properties();
        props.put(ConsumerConfig.BOOTSTRAP_SERVERS_CONFIG, broker.bootstrapServers());
        props.put(ConsumerConfig.ISOLATION_LEVEL_CONFIG, "read_committed");
        KafkaConsumer<byte[], byte[]> consumer = new KafkaConsumer<>(props, new ByteArrayDeserializer(),
                new ByteArrayDeserializer());
        TopicPartition partition = new TopicPartition(SETTINGS.decisionsTopic(), 0);
        consumer.assign(List.of(partition));
        consumer.seekToBeginning(List.of(partition));
        return consumer;
    }

    private static void deleteRecursively(Path dir) throws IOException {
        if (!Files.exists(dir)) {
            return;
        }
        try (Stream<Path> paths = Files.walk(dir)) {
            for (Path p : paths.sorted(Comparator.reverseOrder()).toList()) {
                Files.delete(p);
            }
        }
    }
}
