package dev.runoff.demo;

import dev.runoff.job.StreamsJob;

import dev.runoff.job.JobConfig;
import dev.runoff.job.SigningSettings;
import dev.runoff.records.Ed25519;
import dev.runoff.records.Pem;
import dev.runoff.job.AppSettings;
import dev.runoff.job.DefinitionsClient;
import dev.runoff.job.TopicSpec;
import dev.runoff.job.TopicCreator;
import dev.runoff.job.DecisionLog;

import dev.runoff.testkit.Ports;

import dev.runoff.testkit.Http;

import dev.runoff.testkit.Directories;

import dev.runoff.testkit.Await;


import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;
import dev.runoff.broker.EmbeddedKafkaBroker;
import dev.runoff.records.Format;
import dev.runoff.records.avro.EventType;
import dev.runoff.records.avro.OutcomeEvent;
import dev.runoff.records.RecordCodec;
import java.net.http.HttpResponse;
import java.nio.charset.StandardCharsets;
import java.util.ArrayList;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Clock;
import java.time.Duration;
import java.util.List;
import java.util.Map;
import java.util.Optional;
import java.util.Set;
import java.util.TreeSet;
import java.util.concurrent.CopyOnWriteArrayList;
import org.apache.commons.rng.UniformRandomProvider;
import org.apache.commons.rng.simple.RandomSource;
import org.apache.kafka.clients.admin.Admin;
import org.apache.kafka.clients.producer.KafkaProducer;
import org.apache.kafka.clients.producer.ProducerRecord;
import org.apache.kafka.common.serialization.ByteArraySerializer;
import org.apache.kafka.streams.KafkaStreams;
import org.apache.logging.log4j.LogManager;
import org.apache.logging.log4j.core.LogEvent;
import org.apache.logging.log4j.core.Logger;
import org.apache.logging.log4j.core.appender.AbstractAppender;
import org.apache.logging.log4j.core.config.Property;
import org.junit.jupiter.api.AfterAll;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;

/**
 * Two instances of the job against one embedded broker: readiness, metrics, interactive queries (found here,
 * redirected to the instance that holds the key, unknown), the rejected-records counter and the decision log.
 */
class StreamsJobIT {

    private static final Duration TIMEOUT = Duration.ofSeconds(90);
    private static final ObjectMapper JSON = new ObjectMapper();
    private static final String ID = DemoScenario.EXPERIMENT_ID;

    private static EmbeddedKafkaBroker broker;
    private static Path dir;

    @BeforeAll
    static void startBroker() {
        dir = Directories.fresh("streams-job");
        broker = EmbeddedKafkaBroker.builder(dir.resolve("kafka")).build().start();
    }

    @AfterAll
    static void stopBroker() {
        broker.close();
    }

    private static JobConfig config(String instance, int httpPort) {
        Map<String, String> values = new java.util.HashMap<>(Map.of("bootstrap.servers", broker.bootstrapServers(),
                "application.id", "job-test", "state.dir", dir.resolve(instance).toString(),
                "application.server", "127.0.0.1:" + httpPort, "commit.interval.ms", "100",
                "num.stream.threads", "1", "runoff.http.port", String.valueOf(httpPort),
                "runoff.flush.interval.ms", "100", "runoff.allocate.interval.ms", "100"));
        values.put(SigningSettings.KEY_FILE_KEY, keyFile().toString());
        values.put(SigningSettings.KEY_ID_KEY, "job-it");
        return JobConfig.of(values);
    }

    /** A private key PEM for the job, as a mounted Secret would hold it. */
    private static Path keyFile() {
        Path file = dir.resolve("signing.pem");
        if (!Files.exists(file)) {
            try {
                Files.writeString(file, Pem.write(Ed25519.generate("job-it", new java.security.SecureRandom())
                        .signing()));
            } catch (java.io.IOException e) {
                throw new java.io.UncheckedIOException(e);
            }
        }
        return file;
    }

    @Test
    void twoInstancesServeHealthMetricsAndExperimentState() throws Exception {
        List<String> decisionLines = new CopyOnWriteArrayList<>();
        Logger decisionLogger = (Logger) LogManager.getLogger(DecisionLog.class);
        AbstractAppender capture = new AbstractAppender("capture", null, null, true, Property.EMPTY_ARRAY) {
            @Override
            public void append(LogEvent event) {
                decisionLines.add(event.getMessage().getFormattedMessage());
            }
        };
        capture.start();
        decisionLogger.addAppender(capture);
        JobConfig first = config("one", Ports.free());
        try (Admin admin = Admin.create(first.clientProperties(JobConfig.Client.ADMIN))) {
            new TopicCreator(admin, 30_000).ensure(TopicSpec.of(first.topology()), 2, Optional.empty());
        }
        try (StreamsJob one = StreamsJob.start(first);
             StreamsJob two = StreamsJob.start(config("two", Ports.free()))) {
            List<StreamsJob> jobs = List.of(one, two);
            Await.until("both instances RUNNING", TIMEOUT, () -> jobs.stream().allMatch(
                    j -> j.state() == KafkaStreams.State.RUNNING));
            for (StreamsJob j : jobs) {
                assertEquals(200, Http.get(j.httpPort(), "/ready").statusCode());
                assertEquals(200, Http.get(j.httpPort(), "/health").statusCode());
            }
            DemoScenario scenario = new DemoScenario(2);
            new DefinitionsClient(first, Duration.ofSeconds(30)).put(scenario.definition(1_000, 1_000_000, 0.05, 20),
                    Format.AVRO);
            // events for an experiment an instance does not know yet are rejected: wait until both know it
            Await.until("the definition accepted by both instances", TIMEOUT,
                    () -> jobs.stream().allMatch(j -> j.accepts(ID)) && holder(jobs) != null);
            List<OutcomeEvent> events = visitors(400, scenario, Clock.systemUTC().millis());
            long[][] truth = truth(events, scenario.layouts());
            send(first, events);
            send(first, returns(events, 40, 17));
            send(first, List.of(OutcomeEvent.newBuilder().setExperimentId("no-such-experiment").setUnitId("u")
                    .setEventId("bad-1").setType(EventType.EXPOSURE).setTimestamp(1).setArm("a").build()));
            Await.until("the folded counts of all 400 visitors", TIMEOUT, () -> holder(jobs) != null
                    && totalTrials(Http.get(holder(jobs).httpPort(), "/experiments/" + ID)) == 400);
            StreamsJob holder = holder(jobs);
            JsonNode state = JSON.readTree(Http.get(holder.httpPort(), "/experiments/" + ID).body());
            checkState(state, truth, scenario.layouts());

            StreamsJob other = holder == one ? two : one;
            HttpResponse<String> moved = Http.get(other.httpPort(), "/experiments/" + ID);
            assertEquals(307, moved.statusCode(), moved.body());
            assertEquals("http://127.0.0.1:" + holder.httpPort() + "/experiments/" + ID,
                    moved.headers().firstValue("Location").orElseThrow());

            // each instance reads the whole decisions topic: both list the experiment, whichever holds it
            Await.until("the experiment on both instances' lists", TIMEOUT, () -> jobs.stream().allMatch(
                    j -> Http.get(j.httpPort(), "/").body().contains("<a href=\"/experiments/" + ID + "\">")));

            Set<Integer> unknown = new TreeSet<>();
            jobs.forEach(j -> unknown.add(Http.get(j.httpPort(), "/experiments/no-such-experiment").statusCode()));
            assertEquals(Set.of(307, 404), unknown);

            Await.until("the rejected event counted", TIMEOUT, () -> sum(jobs, "runoff_rejected_total",
                    "reason=\"unknown-experiment\"") == 1.0);
            Await.until("one decision record sent", TIMEOUT, () -> sum(jobs, "kafka_producer_topic_record_send_total",
                    "topic=\"runoff.decisions\"") >= 1.0);
            Await.until("the 400 folded trials counted", TIMEOUT, () -> sum(jobs, "runoff_events_folded_total",
                    "application=\"job-test\"") == 400.0);
            Await.until("a decision counted", TIMEOUT, () -> sum(jobs, "runoff_decisions_total",
                    "application=\"job-test\"") >= 1.0);
            assertTrue(Http.get(holder.httpPort(), "/metrics").body().contains("runoff_allocation_pass_seconds_count{"),
                    "allocation pass timer");
            assertEquals(1.0, sum(jobs, "runoff_experiments", "status=\"running\""));
            assertEquals(2.0, sum(jobs, "runoff_streams_running", "application=\"job-test\""));
            // one shared cache for every RocksDB store (BoundedRocksDbConfig); without it each store reports
            // Kafka Streams' default block cache of 50 MiB (RocksDBStore, from memory)
            Await.until("RocksDB metrics of an open store", TIMEOUT, () -> Http.get(holder.httpPort(), "/metrics")
                    .body().lines().anyMatch(l -> l.startsWith("kafka_stream_state_block_cache_capacity{")
                            && !l.endsWith(" 0.0")));
            String metrics = Http.get(holder.httpPort(), "/metrics").body();
            List<String> capacities = metrics.lines()
                    .filter(l -> l.startsWith("kafka_stream_state_block_cache_capacity{")).toList();
            // A window store with no segment open yet (the two stores of event ids before their task has
            // written its start anchor, SeenEvents) reports 0: its recorder sums over open segments and has
            // none (observed here before the anchors existed; RocksDBMetricsRecorder, from memory). 0 is not the
            // failure this checks for: a store with a cache of its own reports its size.
            boolean sharedSeen = false;
            for (String line : capacities) {
                double capacity = Double.parseDouble(line.substring(line.lastIndexOf(' ') + 1));
                if (capacity == 0.0 && line.contains("store_type=\"rocksdb.window\"")) {
                    continue;
                }
                assertEquals((double) AppSettings.ROCKSDB_CACHE_BYTES, capacity, line);
                sharedSeen = true;
            }
            assertTrue(sharedSeen, "no store reports the shared block cache: " + capacities);
            assertTrue(metrics.contains("kafka_stream_thread_punctuate_latency_avg{"), "punctuation time");
            assertTrue(metrics.contains("store_type=\"rocksdb.window\""), "window-store metrics kept");
            assertFalse(decisionLines.isEmpty(), "no decision log line");
            assertTrue(decisionLines.get(0).startsWith("event=decision experiment=" + ID + " version=1 sequence=1 "),
                    decisionLines.get(0));
        } finally {
            decisionLogger.removeAppender(capture);
        }
    }

    /**
     * {@code count} visitors at time {@code now}, seeded: an EXPOSURE each to a layout drawn uniformly, and a
     * CONVERSION (without arm) for those who book at the layout's hidden rate.
     */
    private static List<OutcomeEvent> visitors(int count, DemoScenario scenario, long now) {
        UniformRandomProvider rng = RandomSource.SPLIT_MIX_64.create(5);
        List<OutcomeEvent> events = new ArrayList<>();
        for (int n = 1; n <= count; n++) {
            int arm = rng.nextInt(scenario.layouts().size());
            events.add(event("visitor-" + n, n + "-x", EventType.EXPOSURE, now, scenario.layouts().get(arm)));
            if (rng.nextDouble() < scenario.rates()[arm]) {
                events.add(event("visitor-" + n, n + "-b", EventType.CONVERSION, now, null));
            }
        }
        return events;
    }

    /**
     * {@code repeats} further exposures of each of the first {@code units} visitors to the layout they saw: the
     * same trials (a unit counts once), but more recent event ids than a unit's entry keeps, so the overflow
     * window store of event ids opens segments (and reports RocksDB metrics) on the tasks these units reach.
     */
    private static List<OutcomeEvent> returns(List<OutcomeEvent> events, int units, int repeats) {
        List<OutcomeEvent> more = new ArrayList<>();
        events.stream().filter(e -> e.getType() == EventType.EXPOSURE).limit(units).forEach(e -> {
            for (int r = 1; r <= repeats; r++) {
                more.add(event(e.getUnitId(), e.getEventId() + "-again-" + r, EventType.EXPOSURE, e.getTimestamp(),
                        e.getArm()));
            }
        });
        return more;
    }

    private static OutcomeEvent event(String unit, String eventId, EventType type, long now, String arm) {
        return OutcomeEvent.newBuilder().setExperimentId(ID).setUnitId(unit).setEventId(eventId).setType(type)
                .setTimestamp(now).setArm(arm).build();
    }

    /** Sends {@code events} keyed by unit id and waits until the broker has them all. */
    private static void send(JobConfig config, List<OutcomeEvent> events) {
        try (KafkaProducer<byte[], byte[]> producer = new KafkaProducer<>(
                config.clientProperties(JobConfig.Client.PRODUCER), new ByteArraySerializer(),
                new ByteArraySerializer())) {
            for (OutcomeEvent e : events) {
                producer.send(new ProducerRecord<>(config.topology().outcomesTopic(),
                        e.getUnitId().getBytes(StandardCharsets.UTF_8), RecordCodec.outcomeEvents().encode(e)));
            }
            producer.flush();
        }
    }

    /** Exposures and bookings per arm of {@code events}. */
    private static long[][] truth(List<OutcomeEvent> events, List<String> arms) {
        long[][] t = new long[arms.size()][2];
        int last = -1;
        for (OutcomeEvent e : events) {
            if (e.getType() == EventType.EXPOSURE) {
                last = arms.indexOf(e.getArm());
                t[last][0]++;
            } else {
                t[last][1]++;
            }
        }
        return t;
    }

    private static void checkState(JsonNode state, long[][] truth, List<String> arms) {
        assertEquals(ID, state.get("experimentId").asText());
        assertEquals(1, state.get("definitionVersion").asLong());
        assertEquals("RUNNING", state.get("status").asText());
        assertTrue(state.get("decisionSequence").asLong() >= 1, state.toString());
        assertEquals(64, state.get("lastHash").asText().length());
        assertEquals(arms.size(), state.get("definition").get("arms").size());
        for (int i = 0; i < arms.size(); i++) {
            JsonNode arm = state.get("arms").get(i);
            assertEquals(arms.get(i), arm.get("arm").asText());
            assertEquals(truth[i][0], arm.get("trials").asLong(), "trials of " + arms.get(i));
            assertEquals(truth[i][1], arm.get("successes").asLong(), "bookings of " + arms.get(i));
        }
    }

    /** The instance whose /experiments/{ID} answers 200, or null. */
    private static StreamsJob holder(List<StreamsJob> jobs) {
        return jobs.stream().filter(j -> Http.get(j.httpPort(), "/experiments/" + ID).statusCode() == 200)
                .findFirst().orElse(null);
    }

    private static long totalTrials(HttpResponse<String> response) {
        try {
            long sum = 0;
            for (JsonNode arm : JSON.readTree(response.body()).get("arms")) {
                sum += arm.get("trials").asLong();
            }
            return sum;
        } catch (java.io.IOException e) {
            throw new AssertionError(e);
        }
    }

    /** Sum over both instances of the samples of {@code metric} whose labels contain {@code label}. */
    private static double sum(List<StreamsJob> jobs, String metric, String label) {
        double total = 0;
        for (StreamsJob j : jobs) {
            for (String line : Http.get(j.httpPort(), "/metrics").body().split("\n")) {
                if (line.startsWith(metric + "{") && line.contains(label)) {
                    total += Double.parseDouble(line.substring(line.lastIndexOf(' ') + 1));
                }
            }
        }
        return total;
    }
}
