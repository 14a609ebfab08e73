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
import java.lang.management.ManagementFactory;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.Comparator;
import java.util.HashMap;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Locale;
import java.util.Map;
import java.util.Properties;
import java.util.SplittableRandom;
import java.util.concurrent.CountDownLatch;
import java.util.concurrent.TimeUnit;
import java.util.function.ToDoubleFunction;
import java.util.stream.Collectors;
import java.util.stream.Stream;
import java.util.zip.CRC32;
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
import org.apache.kafka.streams.CloseOptions;
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
 * Throughput of the job against the embedded broker, measured in the same run as a bare count-by-key
 * topology on the same input (all exactly_once_v2, one instance).
 *
 * <p>The input is N outcome events in JSON (exposures keyed by unit id, about 12% followed by an arm-less
 * click) over 20 three-arm experiments (option {@code experiments=}). Two inputs: {@code murmur2}, partitioned
 * by the Java client's default partitioner (the common case), and {@code crc32}, the same records keyed by unit
 * id but placed by CRC32 of the key modulo the partition count, as producers in other languages often do. Three
 * applications: {@code bare} (count by key), {@code job} (the job as configured by default: every event
 * through the events-by-unit repartition) and {@code unit} (the job with {@code runoff.outcomes.keyed.by.unit=
 * true}). Each run uses fresh topics and a fresh application: it starts the application, lets the job accept
 * the definitions, then writes the events and is timed from the first write until the group's committed
 * offsets reach the end of every topic it reads per event: the input, and for the job also its repartition
 * topic of events (after which every event has been validated, deduplicated, attributed and pre-aggregated).
 * Within a round the runs alternate in the order given; each round's ratios to the bare run of the same
 * input are printed, then their medians.
 *
 * <p>Run (after {@code mvn -B -q -DskipTests package -pl src/bench -am}): {@code java -cp
 * src/bench/target/classes:target/runoff.jar dev.runoff.bench.TopologyThroughput 200000 3 inputs=murmur2,crc32}: events,
 * rounds, then options {@code partitions=4} (of the input topic), {@code threads=1} (stream threads of every
 * application; a list such as {@code 1,2,3} runs each count in every round, for a scale-out figure),
 * {@code apps=bare,job,unit} ({@code producer} times the bench's producer alone, writing the same events to a
 * fresh topic), {@code inputs=murmur2}, {@code commit.interval.ms=default} (Kafka Streams', 100 ms with
 * exactly_once_v2; a list such as {@code default,1000} runs each) and {@code preload=false} ({@code true}: the
 * events are written while the application is stopped and the run is timed from its restart's RUNNING state,
 * so that the producer's rate cannot bound it; {@code pause}: the events are written while the running
 * application is paused ({@link KafkaStreams#pause()}) and the run is timed from its resumption, so that the
 * tasks keep the threads of the first assignment, which spreads each sub-topology over the threads; the
 * assignment after a restart follows the tasks' state on disk and put most tasks of the job's unit
 * sub-topology on one or two threads, as the breakdown shows), {@code experiments=20} (experiments the events
 * are spread over), {@code variants=default} (Kafka Streams settings of every application: {@code key=value}
 * pairs separated by {@code ;}, several variants separated by {@code |}, {@code default} for none; for example
 * {@code variants=default|producer.linger.ms=20}) and {@code broker.<property>=value} (a property of the
 * embedded broker). Every combination of thread count, commit interval and variant runs once per round, in an order
 * rotated by one each round so that none always runs first. After each timed run a breakdown says where the
 * stream threads' wall time went and how many cores each group of threads used ({@link RunBreakdown}). The
 * summary gives, for every application, input and setup, the events per second of each round, the stream
 * threads' CPU time per event and the busiest stream thread's share of that CPU, with medians and per-round
 * ratios to the bare run (for CPU per event, the bare run's figure over the application's, so that it reads like
 * a ratio of rates); CPU time moves far less than wall time when other work shares the machine.
 */
public final class TopologyThroughput {

    private static final List<String> OPTIONS = List.of("partitions", "threads", "apps", "inputs",
            "commit.interval.ms", "preload", "experiments", "variants");
    /** One directory per process, so that two runs side by side never share a broker's files. */
    private static final Path DIR = Path.of("target", "bench-throughput-" + ProcessHandle.current().pid());
    private static final List<String> APPS = List.of("bare", "job", "unit", "producer");
    private static final List<String> INPUTS = List.of("murmur2", "crc32");

    private final int events;
    private final int partitions;
    private final List<Integer> threads;
    private final List<String> commitIntervals;
    private final String preload;
    private final int experiments;
    private final List<Map<String, String>> variants;

    private TopologyThroughput(int events, int partitions, List<Integer> threads, List<String> commitIntervals,
                               String preload, int experiments, List<Map<String, String>> variants) {
        this.events = events;
        this.partitions = partitions;
        this.threads = threads;
        this.commitIntervals = commitIntervals;
        this.preload = preload;
        this.experiments = experiments;
        this.variants = variants;
    }

    /**
     * Stream threads, commit interval and Kafka Streams settings of one group of runs; {@code label} tells
     * groups apart in the output.
     */
    private record Setup(int threads, String commitIntervalMs, Map<String, String> streamsConfig, String label) {
    }

    /**
     * One timed run: events per second, the stream threads' CPU time per event in microseconds, and the busiest
     * stream thread's share of that CPU (1 / threads when the work spread evenly); NaN when no application ran.
     */
    private record Run(double rate, double cpuMicrosPerEvent, double busiestShare) {
    }

    /** Every combination of the thread counts, commit intervals and variants asked for. */
    private List<Setup> setups() {
        List<Setup> setups = new ArrayList<>();
        for (int t : threads) {
            for (String commit : commitIntervals) {
                for (int v = 0; v < variants.size(); v++) {
                    String label = (threads.size() > 1 ? "/" + t + "t" : "")
                            + (commitIntervals.size() > 1 ? "/c" + commit : "")
                            + (variants.size() > 1 ? "/v" + v : "");
                    setups.add(new Setup(t, commit.equals("default") ? null : commit, variants.get(v), label));
                }
            }
        }
        return setups;
    }

    /**
     * The variants of {@code text}: separated by {@code |}, each {@code default} or Kafka Streams settings
     * {@code key=value} separated by {@code ;}.
     */
    private static List<Map<String, String>> variants(String text) {
        List<Map<String, String>> variants = new ArrayList<>();
        for (String variant : text.split("\\|")) {
            Map<String, String> config = new LinkedHashMap<>();
            for (String setting : variant.equals("default") ? new String[0] : variant.split(";")) {
                String[] pair = setting.split("=", 2);
                if (pair.length != 2 || pair[0].isBlank()) {
                    throw new IllegalArgumentException("variant setting '" + setting + "' is not key=value");
                }
                config.put(pair[0], pair[1]);
            }
            variants.add(config);
        }
        return variants;
    }

    /**
     * Runs the benchmark.
     *
     * @param args number of events (default 200000), rounds (default 2), then {@code name=value} options
     */
    public static void main(String[] args) throws Exception {
        int events = args.length > 0 ? Integer.parseInt(args[0]) : 200_000;
        int rounds = args.length > 1 ? Integer.parseInt(args[1]) : 2;
        Map<String, String> options = new HashMap<>();
        for (int i = 2; i < args.length; i++) {
            String[] pair = args[i].split("=", 2);
            boolean broker = pair[0].startsWith("broker.") && pair[0].length() > "broker.".length();
            if (pair.length != 2 || !OPTIONS.contains(pair[0]) && !broker) {
                throw new IllegalArgumentException("unknown option '" + args[i] + "' (" + String.join("=, ", OPTIONS)
                        + "=, broker.<property>=)");
            }
            options.put(pair[0], pair[1]);
        }
        List<String> apps = listOption(options.getOrDefault("apps", "bare,job,unit"), APPS);
        List<String> inputs = listOption(options.getOrDefault("inputs", "murmur2"), INPUTS);
        TopologyThroughput bench = new TopologyThroughput(events,
                Integer.parseInt(options.getOrDefault("partitions", "4")),
                Stream.of(options.getOrDefault("threads", "1").split(",")).map(Integer::valueOf).toList(),
                List.of(options.getOrDefault("commit.interval.ms", "default").split(",")),
                preload(options.getOrDefault("preload", "false")),
                Integer.parseInt(options.getOrDefault("experiments", "20")),
                variants(options.getOrDefault("variants", "default")));
        List<Setup> setups = bench.setups();
        delete(DIR);
        Map<String, List<Run>> runs = new LinkedHashMap<>();
        EmbeddedKafkaBroker.Builder brokerBuilder = EmbeddedKafkaBroker.builder(DIR.resolve("broker"));
        options.forEach((key, value) -> {
            if (key.startsWith("broker.")) {
                brokerBuilder.property(key.substring("broker.".length()), value);
            }
        });
        try (EmbeddedKafkaBroker broker = brokerBuilder.build().start()) {
            for (int round = 0; round < rounds; round++) {
                for (int i = 0; i < setups.size(); i++) {
                    Setup setup = setups.get((i + round) % setups.size());
                    for (String input : inputs) {
                        for (String app : apps) {
                            String variant = input + setup.label();
                            runs.computeIfAbsent(app + "/" + variant, k -> new ArrayList<>()).add(bench.run(broker,
                                    app + "-" + variant.replace('/', '-') + "-" + round, app, input, setup));
                        }
                    }
                }
            }
        }
        delete(DIR);
        System.out.printf(Locale.ROOT, "events=%d partitions=%d threads=%s experiments=%d cores=%d "
                        + "commit.interval.ms=%s (default: 100 with exactly_once_v2) preload=%s variants=%s "
                        + "broker=%s%n", events, bench.partitions, bench.threads, bench.experiments,
                Runtime.getRuntime().availableProcessors(), bench.commitIntervals, bench.preload, bench.variants,
                options.entrySet().stream().filter(e -> e.getKey().startsWith("broker.")).toList());
        for (Map.Entry<String, List<Run>> e : runs.entrySet()) {
            String variant = e.getKey().substring(e.getKey().indexOf('/') + 1);
            List<Run> bare = e.getKey().startsWith("bare/") ? null : runs.get("bare/" + variant);
            System.out.println(summary(e.getKey(), e.getValue(), bare, Run::rate, "events/s", "%.0f", false));
            if (!e.getKey().startsWith("producer/")) {
                System.out.println(summary(e.getKey(), e.getValue(), bare, Run::cpuMicrosPerEvent,
                        "stream-thread CPU us/event", "%.1f", true));
                System.out.println(summary(e.getKey(), e.getValue(), null, Run::busiestShare,
                        "busiest stream thread's share of that CPU", "%.2f", false));
            }
        }
    }

    /**
     * One summary line: the figure of every round, its median and, when {@code bare} is given, the per-round
     * ratio to the bare run's figure of the same round (the bare figure over this one when {@code inverse}, so
     * that a ratio of CPU per event reads like one of rates) and its median.
     */
    private static String summary(String key, List<Run> runs, List<Run> bare, ToDoubleFunction<Run> figure,
                                  String what, String pattern, boolean inverse) {
        List<Double> values = runs.stream().map(figure::applyAsDouble).toList();
        StringBuilder line = new StringBuilder(String.format(Locale.ROOT, "%-18s %s %s, median " + pattern, key,
                what, format(values, pattern), median(values)));
        if (bare != null) {
            List<Double> ratios = new ArrayList<>();
            for (int i = 0; i < values.size(); i++) {
                double b = figure.applyAsDouble(bare.get(i));
                ratios.add(inverse ? b / values.get(i) : values.get(i) / b);
            }
            line.append(String.format(Locale.ROOT, "; per-round ratio to bare %s, median %.2f",
                    format(ratios, "%.2f"), median(ratios)));
        }
        return line.toString();
    }

    private static String preload(String text) {
        if (!List.of("false", "true", "pause").contains(text)) {
            throw new IllegalArgumentException("preload='" + text + "': must be false, true or pause");
        }
        return text;
    }

    private static List<String> listOption(String text, List<String> known) {
        List<String> values = List.of(text.split(","));
        if (!known.containsAll(values)) {
            throw new IllegalArgumentException("'" + text + "': each must be one of " + known);
        }
        return values;
    }

    private static double median(List<Double> values) {
        List<Double> sorted = values.stream().sorted().toList();
        int n = sorted.size();
        return n % 2 == 1 ? sorted.get(n / 2) : (sorted.get(n / 2 - 1) + sorted.get(n / 2)) / 2;
    }

    private static String format(List<Double> values, String pattern) {
        return values.stream().map(r -> String.format(Locale.ROOT, pattern, r)).collect(Collectors.joining(", "));
    }

    private void createTopics(EmbeddedKafkaBroker broker, TopologySettings s) {
        Map<String, String> compact = Map.of("cleanup.policy", "compact");
        broker.createTopic(s.outcomesTopic(), partitions, Map.of());
        broker.createTopic(s.definitionsTopic(), partitions, compact);
        broker.createTopic(s.acceptedDefinitionsTopic(), partitions, compact);
        broker.createTopic(s.allocationsTopic(), partitions, compact);
        broker.createTopic(s.decisionsTopic(), partitions, Map.of());
        broker.createTopic(s.rejectedTopic(), partitions, Map.of());
        broker.createTopic(s.outcomesTopic() + ".counts", partitions, Map.of());
        awaitLeaders(broker, List.of(s.outcomesTopic(), s.definitionsTopic(), s.acceptedDefinitionsTopic(),
                s.allocationsTopic(), s.decisionsTopic(), s.rejectedTopic(), s.outcomesTopic() + ".counts"));
    }

    /**
     * Waits until every partition of {@code topics} has a leader: a Kafka Streams client started on a topic
     * the broker has just created can otherwise find no partitions for it and stop.
     */
    private void awaitLeaders(EmbeddedKafkaBroker broker, List<String> topics) {
        try (Admin admin = Admin.create(Map.of(AdminClientConfig.BOOTSTRAP_SERVERS_CONFIG, broker.bootstrapServers()))) {
            for (int attempt = 0; attempt < 600; attempt++) {
                try {
                    boolean ready = admin.describeTopics(topics).allTopicNames().get().values().stream()
                            .allMatch(d -> d.partitions().size() == partitions
                                    && d.partitions().stream().allMatch(p -> p.leader() != null));
                    if (ready) {
                        return;
                    }
                } catch (java.util.concurrent.ExecutionException e) {
                    // not known to the broker's metadata yet: try again
                }
                Thread.sleep(50);
            }
        } catch (InterruptedException e) {
            Thread.currentThread().interrupt();
        }
        throw new IllegalStateException("topics " + topics + " have no leader after 30 s");
    }

    private void produce(EmbeddedKafkaBroker broker, TopologySettings s, String input) {
        SplittableRandom random = new SplittableRandom(2024);
        long now = System.currentTimeMillis();
        try (KafkaProducer<String, byte[]> producer = producer(broker)) {
            int sent = 0;
            for (int unit = 0; sent < events; unit++) {
                String experiment = "exp-" + random.nextInt(experiments);
                String arm = "arm" + random.nextInt(3);
                String unitId = "u" + unit;
                Integer partition = input.equals("crc32") ? crc32Partition(unitId) : null;
                producer.send(new ProducerRecord<>(s.outcomesTopic(), partition, unitId,
                        event(experiment, unitId, unitId + "x", "EXPOSURE", arm, now)));
                sent++;
                if (sent < events && random.nextDouble() < 0.12) {
                    producer.send(new ProducerRecord<>(s.outcomesTopic(), partition, unitId,
                            event(experiment, unitId, unitId + "c", "CLICK", null, now + 50)));
                    sent++;
                }
            }
        }
    }

    /** The partition a CRC32 partitioner picks for {@code key}: CRC32 of its UTF-8 bytes modulo the count. */
    private int crc32Partition(String key) {
        CRC32 crc = new CRC32();
        crc.update(key.getBytes(StandardCharsets.UTF_8));
        return (int) (crc.getValue() % partitions);
    }

    private static KafkaProducer<String, byte[]> producer(EmbeddedKafkaBroker broker) {
        return new KafkaProducer<>(Map.of(ProducerConfig.BOOTSTRAP_SERVERS_CONFIG, broker.bootstrapServers(),
                ProducerConfig.LINGER_MS_CONFIG, 20, ProducerConfig.BATCH_SIZE_CONFIG, 262_144),
                Serdes.String().serializer(), new ByteArraySerializer());
    }

    private void produceDefinitions(EmbeddedKafkaBroker broker, TopologySettings s) {
        try (KafkaProducer<String, byte[]> producer = producer(broker)) {
            for (int e = 0; e < experiments; e++) {
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
    private static Map<String, String> settingsMap(String run) {
        Map<String, String> topics = new HashMap<>();
        for (String key : List.of(TopologySettings.OUTCOMES_TOPIC_KEY, TopologySettings.DEFINITIONS_TOPIC_KEY,
                TopologySettings.ACCEPTED_TOPIC_KEY, TopologySettings.ALLOCATIONS_TOPIC_KEY,
                TopologySettings.DECISIONS_TOPIC_KEY, TopologySettings.REJECTED_TOPIC_KEY)) {
            topics.put(key, run + "." + key.substring("runoff.topic.".length()));
        }
        return topics;
    }

    /**
     * One run of {@code app} on fresh topics: starts the application, lets the job accept the definitions,
     * then writes the events and times from the first write until the input and, for the job, its repartition
     * topic of events are fully consumed. With {@code preload=true} the application is stopped after the
     * definitions are accepted, the events are written, and the run is timed from the moment the restarted
     * application is RUNNING, so the producer's rate does not bound it; with {@code preload=pause} the
     * application is paused instead of stopped and timed from its resumption. {@code producer} times the
     * writing alone. Returns the run's events per second and its stream threads' CPU.
     */
    private Run run(EmbeddedKafkaBroker broker, String name, String app, String input, Setup setup)
            throws Exception {
        boolean job = app.equals("job") || app.equals("unit");
        Map<String, String> config = settingsMap(name);
        if (app.equals("unit")) {
            config.put(TopologySettings.OUTCOMES_KEYED_BY_UNIT_KEY, "true");
        }
        TopologySettings settings = TopologySettings.fromMap(config);
        createTopics(broker, settings);
        if (app.equals("producer")) {
            long began = System.nanoTime();
            produce(broker, settings, input);
            return new Run(report(name, began, new JobCounters(), ""), Double.NaN, Double.NaN);
        }
        JobCounters counters = new JobCounters();
        String application = "bench-" + name;
        Map<String, Object> overrides = new HashMap<>(Map.of(
                StreamsConfig.APPLICATION_ID_CONFIG, application,
                StreamsConfig.BOOTSTRAP_SERVERS_CONFIG, broker.bootstrapServers(),
                StreamsConfig.STATE_DIR_CONFIG, DIR.resolve("state-" + name).toString(),
                StreamsConfig.NUM_STREAM_THREADS_CONFIG, setup.threads(),
                StreamsConfig.consumerPrefix("auto.offset.reset"), "earliest"));
        if (setup.commitIntervalMs() != null) {
            overrides.put(StreamsConfig.COMMIT_INTERVAL_MS_CONFIG, setup.commitIntervalMs());
        }
        // short thread names, so that the kernel's 15-character names of the stream threads stay apart from others
        overrides.put(StreamsConfig.CLIENT_ID_CONFIG, "s");
        overrides.putAll(setup.streamsConfig());
        Properties props = RunoffTopology.streamsConfig(settings, counters, overrides);
        List<String> perEvent = !job ? List.of(settings.outcomesTopic())
                : List.of(settings.outcomesTopic(), application + (app.equals("unit")
                        ? "-events-to-unit-repartition" : "-events-by-unit-repartition"));
        try (Admin admin = Admin.create(Map.of(AdminClientConfig.BOOTSTRAP_SERVERS_CONFIG,
                broker.bootstrapServers()))) {
            long[] runningAt = new long[1];
            KafkaStreams streams = start(topology(job, settings, props, counters), props, name, runningAt);
            try {
                if (job) {
                    produceDefinitions(broker, settings);
                    awaitAccepted(streams);
                }
                long began;
                RunBreakdown atStart;
                if (preload.equals("true")) {
                    streams.close(CloseOptions.groupMembershipOperation(
                            CloseOptions.GroupMembershipOperation.LEAVE_GROUP));
                    produce(broker, settings, input);
                    streams = start(topology(job, settings, props, counters), props, name, runningAt);
                    atStart = RunBreakdown.take(streams);
                    began = runningAt[0];
                } else if (preload.equals("pause")) {
                    streams.pause();
                    produce(broker, settings, input);
                    atStart = RunBreakdown.take(streams);
                    began = System.nanoTime();
                    streams.resume();
                } else {
                    atStart = RunBreakdown.take(streams);
                    began = System.nanoTime();
                    produce(broker, settings, input);
                }
                awaitNoLag(admin, application, perEvent);
                RunBreakdown atEnd = RunBreakdown.take(streams);
                double rate = report(name, began, counters, atEnd.since(atStart));
                return new Run(rate, 1e6 * atEnd.streamCpuSeconds(atStart) / events,
                        atEnd.busiestStreamThreadShare(atStart));
            } finally {
                streams.close();
            }
        }
    }

    private static Topology topology(boolean job, TopologySettings settings, Properties props, JobCounters counters) {
        return job ? RunoffTopology.build(settings, props, counters) : countByKey(settings, props);
    }

    /** Starts {@code topology} and waits until it is RUNNING, whose time (nanoTime) goes in {@code runningAt}. */
    private static KafkaStreams start(Topology topology, Properties props, String name, long[] runningAt)
            throws InterruptedException {
        KafkaStreams streams = new KafkaStreams(topology, props);
        CountDownLatch running = new CountDownLatch(1);
        streams.setStateListener((now, before) -> {
            if (now == KafkaStreams.State.RUNNING && running.getCount() > 0) {
                runningAt[0] = System.nanoTime();
                running.countDown();
            }
        });
        streams.start();
        if (!running.await(120, TimeUnit.SECONDS)) {
            streams.close();
            throw new IllegalStateException(name + " did not reach RUNNING");
        }
        return streams;
    }

    private double report(String name, long began, JobCounters counters, String breakdown) {
        double seconds = (System.nanoTime() - began) / 1e9;
        double rate = events / seconds;
        System.out.printf(Locale.ROOT, "%s: %d events in %.2f s = %.0f events/s, in place %d, rerouted %d, "
                        + "counted %s, load average %.1f%n", name, events, seconds, rate, counters.inPlaceEvents(),
                counters.reroutedEvents(), counters.snapshot(),
                ManagementFactory.getOperatingSystemMXBean().getSystemLoadAverage());
        if (!breakdown.isEmpty()) {
            System.out.println(breakdown);
        }
        return rate;
    }

    /** Waits until the job's global store holds every definition. */
    private void awaitAccepted(KafkaStreams streams) throws InterruptedException {
        while (true) {
            ReadOnlyKeyValueStore<String, byte[]> store = streams.store(StoreQueryParameters.fromNameAndType(
                    RunoffTopology.DEFINITIONS_STORE, QueryableStoreTypes.keyValueStore()));
            if (store.approximateNumEntries() >= experiments) {
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

    /**
     * Waits until the group's committed offsets equal the end offsets of every partition of {@code topics}
     * (a partition never written to has nothing to commit).
     */
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
            boolean done = partitions.stream().allMatch(p -> ends.get(p).offset() == 0 || committed.containsKey(p)
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
