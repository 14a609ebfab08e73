package dev.runoff.bench;

import dev.runoff.broker.EmbeddedKafkaBroker;
import dev.runoff.records.RecordCodec;
import dev.runoff.records.avro.AllocationSpec;
import dev.runoff.records.avro.EventType;
import dev.runoff.records.avro.ExperimentDefinition;
import dev.runoff.records.avro.MetricKind;
import dev.runoff.records.avro.MetricSpec;
import dev.runoff.records.avro.StoppingSpec;
import dev.runoff.topology.JobCounters;
import dev.runoff.topology.RunoffTopology;
import dev.runoff.topology.TopologySettings;
import java.io.IOException;
import java.io.UncheckedIOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.Comparator;
import java.util.HashMap;
import java.util.List;
import java.util.Locale;
import java.util.Map;
import java.util.Properties;
import java.util.SplittableRandom;
import java.util.concurrent.CountDownLatch;
import java.util.concurrent.TimeUnit;
import java.util.stream.Collectors;
import java.util.stream.Stream;
import org.apache.kafka.clients.admin.Admin;
import org.apache.kafka.clients.admin.AdminClientConfig;
import org.apache.kafka.clients.admin.OffsetSpec;
import org.apache.kafka.clients.consumer.OffsetAndMetadata;
import org.apache.kafka.clients.producer.KafkaProducer;
import org.apache.kafka.clients.producer.ProducerConfig;
import org.apache.kafka.clients.producer.ProducerRecord;
import org.apache.kafka.common.TopicPartition;
import org.apache.kafka.common.serialization.ByteArraySerializer;
import org.apache.kafka.common.serialization.Serdes;
import org.apache.kafka.streams.KafkaStreams;
import org.apache.kafka.streams.StoreQueryParameters;
import org.apache.kafka.streams.StreamsBuilder;
import org.apache.kafka.streams.StreamsConfig;
import org.apache.kafka.streams.Topology;
import org.apache.kafka.streams.TopologyConfig;
import org.apache.kafka.streams.kstream.Consumed;
import org.apache.kafka.streams.kstream.Materialized;
import org.apache.kafka.streams.kstream.Produced;
import org.apache.kafka.streams.state.QueryableStoreTypes;
import org.apache.kafka.streams.state.ReadOnlyKeyValueStore;

/**
 * Throughput of the full job against the embedded broker, measured in the same run as a bare count-by-key
 * topology on the same input (both exactly_once_v2, one stream thread, one instance).
 *
 * <p>The input is N outcome events in JSON (exposures keyed by unit id, about 12% followed by an arm-less
 * click) over 20 three-arm experiments, on a 4-partition topic. Each run uses fresh topics and a fresh
 * application: it starts the application, lets the job accept the definitions, then writes the same events
 * and is timed from the first write until the group's committed offsets reach the end of every topic it
 * reads per event: the input, and for the job also its events-by-unit repartition topic (after which every
 * event has been validated, deduplicated, attributed and pre-aggregated). The runs alternate, bare first,
 * {@code rounds} times each.
 *
 * <p>Run: {@code mvn -B -q -o -pl src/bench org.codehaus.mojo:exec-maven-plugin:3.5.0:java
 * -Dexec.mainClass=dev.runoff.bench.TopologyThroughput -Dexec.args="200000 2"}
 * (events, rounds, and optionally commit.interval.ms for both applications).
 */
public final class TopologyThroughput {

    private static final int PARTITIONS = 4;
    private static final int EXPERIMENTS = 20;
    private static final Path DIR = Path.of("target", "bench-throughput");
    private static String commitIntervalMs;

    private TopologyThroughput() {
    }

    /**
     * Runs the benchmark.
     *
     * @param args number of events (default 200000) and rounds (default 2)
     */
    public static void main(String[] args) throws Exception {
        int events = args.length > 0 ? Integer.parseInt(args[0]) : 200_000;
        int rounds = args.length > 1 ? Integer.parseInt(args[1]) : 2;
        commitIntervalMs = args.length > 2 ? args[2] : null;
        delete(DIR);
        try (EmbeddedKafkaBroker broker = EmbeddedKafkaBroker.builder(DIR.resolve("broker")).build().start()) {
            List<Double> bare = new ArrayList<>();
            List<Double> full = new ArrayList<>();
            for (int round = 0; round < rounds; round++) {
                bare.add(run(broker, "bare-" + round, events, false));
                full.add(run(broker, "full-" + round, events, true));
            }
            double bestBare = bare.stream().mapToDouble(d -> d).max().orElseThrow();
            double bestFull = full.stream().mapToDouble(d -> d).max().orElseThrow();
            System.out.printf(Locale.ROOT, "events=%d partitions=%d experiments=%d cores=%d commit.interval.ms=%s%n",
                    events, PARTITIONS, EXPERIMENTS, Runtime.getRuntime().availableProcessors(),
                    commitIntervalMs == null ? "default (100 with exactly_once_v2)" : commitIntervalMs);
            System.out.println("bare count-by-key events/s per round: " + format(bare));
            System.out.println("full job events/s per round:          " + format(full));
            System.out.printf(Locale.ROOT, "best: bare %.0f/s, full %.0f/s, ratio %.2f%n", bestBare, bestFull,
                    bestFull / bestBare);
        }
    }

    private static String format(List<Double> rates) {
        return rates.stream().map(r -> String.format(Locale.ROOT, "%.0f", r)).collect(Collectors.joining(", "));
    }

    private static void createTopics(EmbeddedKafkaBroker broker, TopologySettings s) {
        Map<String, String> compact = Map.of("cleanup.policy", "compact");
        broker.createTopic(s.outcomesTopic(), PARTITIONS, Map.of());
        broker.createTopic(s.definitionsTopic(), PARTITIONS, compact);
        broker.createTopic(s.acceptedDefinitionsTopic(), PARTITIONS, compact);
        broker.createTopic(s.allocationsTopic(), PARTITIONS, compact);
        broker.createTopic(s.decisionsTopic(), PARTITIONS, Map.of());
        broker.createTopic(s.rejectedTopic(), PARTITIONS, Map.of());
        broker.createTopic(s.outcomesTopic() + ".counts", PARTITIONS, Map.of());
    }

    private static void produce(EmbeddedKafkaBroker broker, TopologySettings s, int events) {
        SplittableRandom random = new SplittableRandom(2024);
        long now = System.currentTimeMillis();
        try (KafkaProducer<String, byte[]> producer = producer(broker)) {
            int sent = 0;
            for (int unit = 0; sent < events; unit++) {
                String experiment = "exp-" + random.nextInt(EXPERIMENTS);
                String arm = "arm" + random.nextInt(3);
                String unitId = "u" + unit;
                producer.send(new ProducerRecord<>(s.outcomesTopic(), unitId,
                        event(experiment, unitId, unitId + "x", "EXPOSURE", arm, now)));
                sent++;
                if (sent < events && random.nextDouble() < 0.12) {
                    producer.send(new ProducerRecord<>(s.outcomesTopic(), unitId,
                            event(experiment, unitId, unitId + "c", "CLICK", null, now + 50)));
                    sent++;
                }
            }
        }
    }

    private static KafkaProducer<String, byte[]> producer(EmbeddedKafkaBroker broker) {
        return new KafkaProducer<>(Map.of(ProducerConfig.BOOTSTRAP_SERVERS_CONFIG, broker.bootstrapServers(),
                ProducerConfig.LINGER_MS_CONFIG, 20, ProducerConfig.BATCH_SIZE_CONFIG, 262_144),
                Serdes.String().serializer(), new ByteArraySerializer());
    }

    private static void produceDefinitions(EmbeddedKafkaBroker broker, TopologySettings s) {
        try (KafkaProducer<String, byte[]> producer = producer(broker)) {
            for (int e = 0; e < EXPERIMENTS; e++) {
                ExperimentDefinition def = definition("exp-" + e);
                producer.send(new ProducerRecord<>(s.definitionsTopic(), def.getExperimentId(),
                        RecordCodec.definitions().encode(def)));
            }
        }
    }

    private static ExperimentDefinition definition(String id) {
        return ExperimentDefinition.newBuilder().setExperimentId(id).setArms(List.of("arm0", "arm1", "arm2"))
                .setMetric(MetricSpec.newBuilder().setKind(MetricKind.BERNOULLI).setSuccessEvent(EventType.CLICK)
                        .build())
                .setAllocation(AllocationSpec.newBuilder().build()).setStopping(StoppingSpec.newBuilder().build())
                .build();
    }

    private static byte[] event(String experiment, String unit, String eventId, String type, String arm, long ts) {
        String json = "{\"experimentId\":\"" + experiment + "\",\"unitId\":\"" + unit + "\",\"eventId\":\"" + eventId
                + "\",\"type\":\"" + type + "\",\"timestamp\":" + ts + (arm == null ? "" : ",\"arm\":\"" + arm + "\"")
                + "}";
        return json.getBytes(StandardCharsets.UTF_8);
    }

    /** Topics of one run, named after it so that every run starts from empty topics. */
    private static TopologySettings settings(String run) {
        Map<String, String> topics = new HashMap<>();
        for (String key : List.of(TopologySettings.OUTCOMES_TOPIC_KEY, TopologySettings.DEFINITIONS_TOPIC_KEY,
                TopologySettings.ACCEPTED_TOPIC_KEY, TopologySettings.ALLOCATIONS_TOPIC_KEY,
                TopologySettings.DECISIONS_TOPIC_KEY, TopologySettings.REJECTED_TOPIC_KEY)) {
            topics.put(key, run + "." + key.substring("runoff.topic.".length()));
        }
        return TopologySettings.fromMap(topics);
    }

    /**
     * One run on fresh topics: starts the application, lets the job accept the definitions, then writes the
     * events and times from the first write until the input and, for the job, its events-by-unit
     * repartition topic are fully consumed. Returns events per second.
     */
    private static double run(EmbeddedKafkaBroker broker, String name, int events, boolean full) throws Exception {
        TopologySettings settings = settings(name);
        createTopics(broker, settings);
        JobCounters counters = new JobCounters();
        String application = "bench-" + name;
        Map<String, Object> overrides = new HashMap<>(Map.of(
                StreamsConfig.APPLICATION_ID_CONFIG, application,
                StreamsConfig.BOOTSTRAP_SERVERS_CONFIG, broker.bootstrapServers(),
                StreamsConfig.STATE_DIR_CONFIG, DIR.resolve("state-" + name).toString(),
                StreamsConfig.consumerPrefix("auto.offset.reset"), "earliest"));
        if (commitIntervalMs != null) {
            overrides.put(StreamsConfig.COMMIT_INTERVAL_MS_CONFIG, commitIntervalMs);
        }
        Properties props = RunoffTopology.streamsConfig(settings, counters, overrides);
        Topology topology = full ? RunoffTopology.build(settings, props, counters) : countByKey(settings, props);
        List<String> perEvent = full
                ? List.of(settings.outcomesTopic(), application + "-events-by-unit-repartition")
                : List.of(settings.outcomesTopic());
        try (KafkaStreams streams = new KafkaStreams(topology, props);
             Admin admin = Admin.create(Map.of(AdminClientConfig.BOOTSTRAP_SERVERS_CONFIG,
                     broker.bootstrapServers()))) {
            CountDownLatch running = new CountDownLatch(1);
            streams.setStateListener((now, before) -> {
                if (now == KafkaStreams.State.RUNNING) {
                    running.countDown();
                }
            });
            streams.start();
            if (!running.await(120, TimeUnit.SECONDS)) {
                throw new IllegalStateException(name + " did not reach RUNNING");
            }
            if (full) {
                produceDefinitions(broker, settings);
                awaitAccepted(streams);
            }
            long began = System.nanoTime();
            produce(broker, settings, events);
            awaitNoLag(admin, application, perEvent);
            double seconds = (System.nanoTime() - began) / 1e9;
            double rate = events / seconds;
            System.out.printf(Locale.ROOT, "%s: %d events in %.2f s = %.0f events/s, rejected %s%n", name, events,
                    seconds, rate, counters.snapshot());
            return rate;
        }
    }

    /** Waits until the job's global store holds every definition. */
    private static void awaitAccepted(KafkaStreams streams) throws InterruptedException {
        while (true) {
            ReadOnlyKeyValueStore<String, byte[]> store = streams.store(StoreQueryParameters.fromNameAndType(
                    RunoffTopology.DEFINITIONS_STORE, QueryableStoreTypes.keyValueStore()));
            if (store.approximateNumEntries() >= EXPERIMENTS) {
                return;
            }
            Thread.sleep(100);
        }
    }

    private static Topology countByKey(TopologySettings settings, Properties props) {
        StreamsBuilder builder = new StreamsBuilder(new TopologyConfig(new StreamsConfig(props)));
        builder.stream(settings.outcomesTopic(), Consumed.with(Serdes.ByteArray(), Serdes.ByteArray()))
                .groupByKey()
                .count(Materialized.as("bench-counts"))
                .toStream()
                .to(settings.outcomesTopic() + ".counts", Produced.with(Serdes.ByteArray(), Serdes.Long()));
        return builder.build(props);
    }

    /** Waits until the group's committed offsets equal the end offsets of every partition of {@code topics}. */
    private static void awaitNoLag(Admin admin, String group, List<String> topics) throws Exception {
        while (true) {
            Map<TopicPartition, OffsetAndMetadata> committed = admin.listConsumerGroupOffsets(group)
                    .partitionsToOffsetAndMetadata().get();
            List<TopicPartition> partitions = admin.describeTopics(topics).allTopicNames().get().values().stream()
                    .flatMap(d -> d.partitions().stream().map(p -> new TopicPartition(d.name(), p.partition())))
                    .toList();
            Map<TopicPartition, OffsetSpec> latest = partitions.stream()
                    .collect(Collectors.toMap(p -> p, p -> OffsetSpec.latest()));
            var ends = admin.listOffsets(latest).all().get();
            boolean done = partitions.stream().allMatch(p -> committed.containsKey(p)
                    && committed.get(p).offset() >= ends.get(p).offset() - markerSlack(p, topics.get(0)));
            if (done) {
                return;
            }
            Thread.sleep(50);
        }
    }

    /**
     * The input is written without transactions: its end offset is reached exactly. A repartition topic is
     * written in transactions whose commit marker takes the last offset.
     */
    private static long markerSlack(TopicPartition partition, String input) {
        return partition.topic().equals(input) ? 0 : 1;
    }

    private static void delete(Path dir) throws IOException {
        if (!Files.exists(dir)) {
            return;
        }
        try (Stream<Path> paths = Files.walk(dir)) {
            for (Path p : paths.sorted(Comparator.reverseOrder()).toList()) {
                try {
                    Files.delete(p);
                } catch (IOException e) {
                    throw new UncheckedIOException(e);
                }
            }
        }
    }
}
