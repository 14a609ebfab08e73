package dev.runoff.job.pages;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;
import static org.junit.jupiter.api.Assumptions.assumeTrue;

import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;
import com.fasterxml.jackson.dataformat.yaml.YAMLFactory;
import dev.runoff.broker.EmbeddedKafkaBroker;
import dev.runoff.job.DefinitionsClient;
import dev.runoff.job.JobConfig;
import dev.runoff.job.StreamsJob;
import dev.runoff.job.TopicCreator;
import dev.runoff.job.TopicSpec;
import dev.runoff.records.Decoded;
import dev.runoff.records.Format;
import dev.runoff.records.RecordCodec;
import dev.runoff.records.avro.ArmState;
import dev.runoff.records.avro.DecisionRecord;
import dev.runoff.records.avro.EventType;
import dev.runoff.records.avro.ExperimentDefinition;
import dev.runoff.records.avro.OutcomeEvent;
import dev.runoff.testkit.Await;
import dev.runoff.testkit.Browser;
import dev.runoff.testkit.Directories;
import dev.runoff.testkit.Http;
import dev.runoff.testkit.Ports;
import dev.runoff.testkit.RepositoryFiles;
import dev.runoff.testkit.TestDefinitions;
import java.awt.image.BufferedImage;
import java.io.IOException;
import java.net.http.HttpResponse;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Duration;
import java.util.ArrayList;
import java.util.Comparator;
import java.util.HashMap;
import java.util.List;
import java.util.Locale;
import java.util.Map;
import java.util.Optional;
import java.util.Set;
import java.util.TreeSet;
import java.util.concurrent.TimeUnit;
import java.util.regex.Matcher;
import java.util.regex.Pattern;
import javax.imageio.ImageIO;
import org.apache.commons.rng.UniformRandomProvider;
import org.apache.commons.rng.simple.RandomSource;
import org.apache.kafka.clients.admin.Admin;
import org.apache.kafka.clients.consumer.ConsumerConfig;
import org.apache.kafka.clients.consumer.ConsumerRecord;
import org.apache.kafka.clients.consumer.KafkaConsumer;
import org.apache.kafka.clients.producer.KafkaProducer;
import org.apache.kafka.clients.producer.ProducerRecord;
import org.apache.kafka.common.TopicPartition;
import org.apache.kafka.common.serialization.ByteArrayDeserializer;
import org.apache.kafka.common.serialization.ByteArraySerializer;
import org.apache.kafka.streams.KafkaStreams;
import org.junit.jupiter.api.AfterAll;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;

/**
 * A running job on the in-JVM broker with one experiment (an arm with a hostile name among them) and a
 * rejected event: headless Chromium (Debian's chromium, as {@code .ci/run} installs it) renders {@code /} and
 * {@code /experiments/{id}}, and the rendered DOM must hold the arm names as text and the numbers of the
 * decision record the page names; the screenshot must show the charts' colours. The dashboard and the alert
 * rules in deploy/monitoring may name only metrics this job exports at {@code /metrics}. The browser test is
 * skipped, and reported as skipped with the reason, only where chromium is not installed.
 */
class LiveJobPagesIT {

    private static final Duration TIMEOUT = Duration.ofSeconds(120);
    private static final Path TARGET = Path.of("target");
    private static final String ID = "ferry-fares";
    private static final String HOSTILE = "<b>bold</b> & \"quoted\"";
    private static final List<String> ARMS = List.of("classic-grid", HOSTILE, "compact-list");
    private static final double[] RATES = {0.03, 0.05, 0.12};
    private static final int WIDTH = 1000;
    private static final int HEIGHT = 1500;

    private static EmbeddedKafkaBroker broker;
    private static StreamsJob job;
    private static JobConfig config;

    @BeforeAll
    static void startJobWithTraffic() throws Exception {
        Path dir = Directories.fresh("live-job-pages");
        broker = EmbeddedKafkaBroker.builder(dir.resolve("kafka")).build().start();
        Map<String, String> values = new HashMap<>(Map.of("bootstrap.servers", broker.bootstrapServers(),
                "application.id", "pages-test", "state.dir", dir.resolve("state").toString(),
                "commit.interval.ms", "100", "num.stream.threads", "1", "runoff.http.port",
                String.valueOf(Ports.free()), "runoff.flush.interval.ms", "100", "runoff.allocate.interval.ms", "100",
                "runoff.signing.required", "false"));
        config = JobConfig.of(values);
        try (Admin admin = Admin.create(config.clientProperties(JobConfig.Client.ADMIN))) {
            new TopicCreator(admin, 30_000).ensure(TopicSpec.of(config.topology()), 1, Optional.empty());
        }
        job = StreamsJob.start(config);
        Await.until("the job RUNNING", TIMEOUT, () -> job.state() == KafkaStreams.State.RUNNING);
        ExperimentDefinition definition = TestDefinitions.perExposure(TestDefinitions.bernoulli(ID,
                ARMS.toArray(String[]::new)));
        new DefinitionsClient(config, Duration.ofSeconds(30)).put(definition, Format.AVRO);
        Await.until("the definition accepted", TIMEOUT, () -> job.accepts(ID));
        UniformRandomProvider random = RandomSource.XO_RO_SHI_RO_128_PP.create(17L);
        for (int round = 0; round < 6; round++) {
            send(visitors(random, round, 300));
            Thread.sleep(1_200);
        }
        send(List.of(OutcomeEvent.newBuilder().setExperimentId("no-such-experiment").setUnitId("u").setEventId("bad")
                .setType(EventType.EXPOSURE).setTimestamp(System.currentTimeMillis()).setArm("a").build()));
        Await.until("several decision records", TIMEOUT, () -> decisions().size() >= 4);
    }

    @AfterAll
    static void stop() {
        if (job != null) {
            job.close();
        }
        if (broker != null) {
            broker.close();
        }
    }

    @Test
    void chromiumRendersBothPagesWithTheDecisionRecordsNumbers() throws Exception {
        String chromium = Browser.chromium();
        assumeTrue(chromium != null, "chromium is not installed (apt-get install -y chromium): browser test skipped");
        String base = "http://127.0.0.1:" + job.httpPort();

        String list = chromium(chromium, base + "/", "--dump-dom");
        assertTrue(list.contains(">" + ID + "</a>"), "the experiment listed");
        assertTrue(list.contains("&lt;b&gt;bold&lt;/b&gt; &amp; \"quoted\""), "the hostile arm name as text");
        assertFalse(list.contains("<b>bold</b>"), "the hostile arm name became markup");

        String dom = chromium(chromium, base + "/experiments/" + ID, "--dump-dom");
        Matcher shown = Pattern.compile("Arms at decision #(\\d+)").matcher(dom);
        assertTrue(shown.find(), "the page names its decision record");
        long sequence = Long.parseLong(shown.group(1));
        DecisionRecord record = decisions().stream().filter(d -> d.getSequence() == sequence).findFirst()
                .orElseThrow(() -> new AssertionError("no decision record #" + sequence + " on the topic"));
        for (ArmState arm : record.getArms()) {
            String name = arm.getArm().replace("&", "&amp;").replace("<", "&lt;").replace(">", "&gt;");
            Matcher row = Pattern.compile("<tr><th scope=\"row\">" + Pattern.quote(name) + "( \\(leader\\))?</th>(.*?)"
                    + "</tr>", Pattern.DOTALL).matcher(dom);
            assertTrue(row.find(), "a row for arm " + arm.getArm());
            String cells = row.group(2);
            assertTrue(cells.contains(String.format(Locale.ROOT, "%,d", arm.getTrials())), "trials of " + name + ": " + cells);
            assertTrue(cells.contains(String.format(Locale.ROOT, "%.4f", arm.getAlpha())), "P(best) of " + name);
            assertTrue(cells.contains(String.format(Locale.ROOT, "%.3f", arm.getWeight())), "weight of " + name);
        }
        assertFalse(dom.contains("<b>bold</b>"), "the hostile arm name became markup");
        assertEvidenceOfALosingArm(dom, record);
        Matcher svg = Pattern.compile("<svg [^>]*width=\"(\\d+)\" height=\"(\\d+)\"").matcher(dom);
        int charts = 0;
        while (svg.find()) {
            charts++;
            assertTrue(Integer.parseInt(svg.group(1)) >= 600 && Integer.parseInt(svg.group(2)) >= 200, svg.group());
        }
        assertEquals(4, charts, "weights, P(best), evidence against trials, statistic against threshold");

        Path png = TARGET.resolve("experiment-page.png").toAbsolutePath();
        Files.deleteIfExists(png);
        chromium(chromium, base + "/experiments/" + ID, "--screenshot=" + png);
        BufferedImage image = ImageIO.read(png.toFile());
        assertEquals(WIDTH, image.getWidth());
        // the first three series colours of LineChart (Okabe-Ito blue, vermillion, bluish green) are drawn
        for (int rgb : new int[] {0x0072B2, 0xD55E00, 0x009E73}) {
            assertTrue(Browser.pixelsNear(image, rgb) > 200, String.format("colour %06x drawn", rgb));
        }
    }

    @Test
    void dashboardAndAlertRulesNameOnlyMetricsTheJobExports() throws Exception {
        Set<String> named = new TreeSet<>();
        JsonNode dashboard = new ObjectMapper().readTree(RepositoryFiles.resolve("deploy", "monitoring",
                "runoff-dashboard.json").toFile());
        List<String> expressions = new ArrayList<>();
        dashboard.get("panels").forEach(p -> p.get("targets").forEach(t -> expressions.add(t.get("expr").asText())));
        dashboard.get("templating").get("list").forEach(v -> {
            if ("query".equals(v.path("type").asText())) {
                expressions.add(v.get("query").asText().replaceAll("^label_values\\((.*),[^,]*\\)$", "$1"));
            }
        });
        JsonNode rules = new ObjectMapper(new YAMLFactory()).readTree(RepositoryFiles.resolve("deploy", "monitoring",
                "runoff-alerts.yaml").toFile());
        int alerts = 0;
        for (JsonNode group : rules.get("groups")) {
            for (JsonNode rule : group.get("rules")) {
                assertTrue(rule.hasNonNull("alert") && rule.hasNonNull("expr"), "an alerting rule: " + rule);
                expressions.add(rule.get("expr").asText());
                alerts++;
            }
        }
        assertTrue(alerts >= 5, "a handful of alerts");
        expressions.forEach(e -> named.addAll(PromQl.metricNames(e)));
        assertTrue(named.containsAll(Set.of("runoff_events_folded_total", "runoff_rejected_total",
                "runoff_allocation_pass_seconds_sum", "runoff_experiments_lagging",
                "runoff_stream_thread_replacements_total", "kafka_consumer_fetch_manager_records_lag_max")),
                "the issue's six subjects: " + named);
        // some metrics appear only once their client has done the work (a topic's first record, a rejection)
        Set<String> missing = new TreeSet<>(named);
        long deadline = System.nanoTime() + TIMEOUT.toNanos();
        while (!missing.isEmpty() && System.nanoTime() < deadline) {
            missing.removeAll(exported(Http.get(job.httpPort(), "/metrics").body()));
            if (!missing.isEmpty()) {
                Thread.sleep(1_000);
            }
        }
        assertEquals(Set.of(), missing, "metrics named in deploy/monitoring that the job does not export");
    }

    @Test
    void laggingAnswersFromTheRunningJobsCensus() throws Exception {
        // The job keeps up with its one experiment (100 ms allocation interval), so none lags; a scan time
        // above 0 shows the answer came from a census of the store, not the empty list held before the first.
        HttpResponse<String> response = Http.get(job.httpPort(), "/lagging");
        assertEquals(200, response.statusCode());
        JsonNode body = new ObjectMapper().readTree(response.body());
        assertEquals(0, body.get("lagging").asLong(), response.body());
        assertEquals(0, body.get("experimentIds").size(), response.body());
        assertTrue(body.get("scannedAt").asLong() > 0, response.body());
    }

    /** Metric names in a Prometheus text exposition. */
    /**
     * The evidence table names the same decision record as the arm table and shows, for a losing arm with a
     * positive P(best), -ln of the record's P(best) (Russo 2020's evidence against the arm).
     */
    private static void assertEvidenceOfALosingArm(String dom, DecisionRecord record) {
        assertTrue(dom.contains("Evidence at decision #" + record.getSequence() + " "), "the evidence table's record");
        ArmState leader = record.getArms().stream().max(Comparator.comparingDouble(ArmState::getAlpha))
                .orElseThrow();
        ArmState loser = record.getArms().stream().filter(a -> a != leader && a.getAlpha() > 0).findFirst()
                .orElseThrow(() -> new AssertionError("no losing arm with a positive P(best) in #" + record.getSequence()));
        String name = loser.getArm().replace("&", "&amp;").replace("<", "&lt;").replace(">", "&gt;");
        Matcher row = Pattern.compile("<tr><th scope=\"row\">" + Pattern.quote(name) + "</th><td class=\"n\">([^<]*)</td>")
                .matcher(dom.substring(dom.indexOf("Evidence at decision #")));
        assertTrue(row.find(), "an evidence row for " + loser.getArm());
        assertEquals(String.format(Locale.ROOT, "%.3g", -Math.log(loser.getAlpha())), row.group(1),
                "evidence against " + loser.getArm());
    }

    private static Set<String> exported(String exposition) {
        Set<String> names = new TreeSet<>();
        exposition.lines().filter(l -> !l.isEmpty() && !l.startsWith("#"))
                .forEach(l -> names.add(l.split("[{ ]", 2)[0]));
        return names;
    }

    private static List<OutcomeEvent> visitors(UniformRandomProvider random, int round, int count) {
        List<OutcomeEvent> events = new ArrayList<>();
        long now = System.currentTimeMillis();
        for (int v = 0; v < count; v++) {
            int arm = random.nextInt(ARMS.size());
            String unit = "visitor-" + round + "-" + v;
            events.add(event(unit, unit + "-x", EventType.EXPOSURE, ARMS.get(arm), now));
            if (random.nextDouble() < RATES[arm]) {
                events.add(event(unit, unit + "-c", EventType.CLICK, ARMS.get(arm), now));
            }
        }
        return events;
    }

    private static OutcomeEvent event(String unit, String eventId, EventType type, String arm, long time) {
        return OutcomeEvent.newBuilder().setExperimentId(ID).setUnitId(unit).setEventId(eventId).setType(type)
                .setArm(arm).setTimestamp(time).build();
    }

    private static void send(List<OutcomeEvent> events) {
        try (KafkaProducer<byte[], byte[]> producer = new KafkaProducer<>(
                config.clientProperties(JobConfig.Client.PRODUCER), new ByteArraySerializer(), new ByteArraySerializer())) {
            for (OutcomeEvent e : events) {
                producer.send(new ProducerRecord<>(config.topology().outcomesTopic(),
                        e.getUnitId().getBytes(StandardCharsets.UTF_8), RecordCodec.outcomeEvents().encode(e)));
            }
        }
    }

    /** Every committed decision record on the topic. */
    private static List<DecisionRecord> decisions() {
        var props = config.clientProperties(JobConfig.Client.CONSUMER);
        props.put(ConsumerConfig.ISOLATION_LEVEL_CONFIG, "read_committed");
        List<DecisionRecord> out = new ArrayList<>();
        try (KafkaConsumer<byte[], byte[]> consumer = new KafkaConsumer<>(props, new ByteArrayDeserializer(),
                new ByteArrayDeserializer())) {
            List<TopicPartition> partitions = consumer.partitionsFor(config.topology().decisionsTopic()).stream()
                    .map(p -> new TopicPartition(p.topic(), p.partition())).toList();
            consumer.assign(partitions);
            consumer.seekToBeginning(partitions);
            Map<TopicPartition, Long> end = consumer.endOffsets(partitions);
            long deadline = System.nanoTime() + TimeUnit.SECONDS.toNanos(30);
            while (partitions.stream().anyMatch(p -> consumer.position(p) < end.get(p)) && System.nanoTime() < deadline) {
                for (ConsumerRecord<byte[], byte[]> r : consumer.poll(Duration.ofMillis(200))) {
                    Decoded<DecisionRecord> d = RecordCodec.decisionRecords().decode(r.value(), r.timestamp());
                    out.add(d.orThrow());
                }
            }
        }
        return out;
    }

    /** Runs headless chromium on {@code url} with {@code action}; returns what it printed (the DOM for --dump-dom). */
    private static String chromium(String chromium, String url, String action) throws IOException, InterruptedException {
        Path profile = Files.createTempDirectory(TARGET.toAbsolutePath(), "chromium-profile");
        Path out = Files.createTempFile(TARGET.toAbsolutePath(), "chromium", ".out");
        List<String> command = List.of(chromium, "--headless", "--no-sandbox", "--disable-gpu",
                "--disable-background-networking", "--disable-component-update", "--disable-sync", "--no-first-run",
                "--user-data-dir=" + profile, "--window-size=" + WIDTH + "," + HEIGHT, action, url);
        Process process = new ProcessBuilder(command).redirectError(TARGET.resolve("chromium-pages.log").toFile())
                .redirectOutput(out.toFile()).start();
        if (!process.waitFor(90, TimeUnit.SECONDS)) {
            process.destroyForcibly();
            throw new AssertionError("chromium did not finish within 90 s; see target/chromium-pages.log");
        }
        return Files.readString(out);
    }
}
