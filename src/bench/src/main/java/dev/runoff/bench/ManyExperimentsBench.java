package dev.runoff.bench;

import dev.runoff.decision.ExperimentState;
import dev.runoff.job.BoundedRocksDbConfig;
import dev.runoff.job.Lagging;
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
import java.time.Duration;
import java.time.Instant;
import java.util.ArrayList;
import java.util.Collections;
import java.util.HashMap;
import java.util.List;
import java.util.Locale;
import java.util.Map;
import java.util.Properties;
import java.util.SplittableRandom;
import java.util.TreeMap;
import java.util.stream.Stream;
import org.apache.kafka.common.Metric;
import org.apache.logging.log4j.Level;
import org.apache.logging.log4j.core.config.Configurator;
import org.apache.kafka.common.MetricName;
import org.apache.kafka.common.serialization.ByteArrayDeserializer;
import org.apache.kafka.common.serialization.ByteArraySerializer;
import org.apache.kafka.streams.KeyValue;
import org.apache.kafka.streams.StreamsConfig;
import org.apache.kafka.streams.TestInputTopic;
import org.apache.kafka.streams.TestOutputTopic;
import org.apache.kafka.streams.TopologyTestDriver;
import org.apache.kafka.streams.state.KeyValueIterator;
import org.apache.kafka.streams.state.KeyValueStore;

/**
 * Many concurrent experiments on one instance: allocation pass latency, lagging experiments, heap and RocksDB
 * memory and disk, per experiment and per arm.
 *
 * <p>The real topology runs under a {@link TopologyTestDriver} with its real RocksDB stores, configured with
 * the job's {@link BoundedRocksDbConfig} as the application sets it. The driver leaves out the broker, the
 * changelog and repartition topics' network and disk cost, transactions, commits and restores; it runs every
 * task on the calling thread, so the figures are those of one stream thread owning every experiment.
 *
 * <p>N five-arm BERNOULLI experiments (CLICK per exposure, unit counting, 30 s conversion window, the
 * default 60 s recompute period) are defined; in the first recompute period each experiment gets five new
 * units (one exposure per arm, a click on one in five), in each later period one experiment in ten does
 * (its statistics change, so it is due again), and the wall clock advances by the allocation
 * interval in steps, so each step fires one allocation pass. Every experiment's first evaluation is due from
 * its definition on. At the end of each period the experiments store is read whole: experiments
 * evaluated in the period, never evaluated, and lagging by the rule of the {@code runoff_experiments_lagging}
 * gauge ({@link Lagging}). At the end: heap used after full collections (with the driver and its stores
 * open), less the heap before the driver was built; the RocksDB properties the stores expose as metrics; the
 * size of the state directory.
 *
 * <p>The job's own logging is set to WARN (it logs one line per accepted definition).
 *
 * <p>Run: {@code java -Xmx4g -cp CLASSPATH dev.runoff.bench.ManyExperimentsBench 100000 3 [runoff.key=value ...]
 * [trace=S] [settle=S]} (experiments, recompute periods, then any job settings, e.g.
 * {@code runoff.allocate.max.evaluations=2000}), CLASSPATH being this module's {@code target/classes} and its
 * compile class path (DEVELOPERS.md). {@code trace=S} reads the whole store after every step and prints,
 * every S seconds of wall clock and at each period's end, the lagging experiments by cause ({@link LagTrace});
 * it slows the run (one full read per step) but not the passes it measures. {@code settle=S} adds S seconds of
 * wall clock without new events after the last period, then a census.
 */
public final class ManyExperimentsBench {

    private static final int ARMS = 5;
    private static final long WINDOW_MS = 30_000L;
    private static final long T0 = 1_700_000_000_000L;
    private static final double CLICK_RATE = 0.2;
    /** After the first period, one experiment in this many gets new units each period. */
    private static final int LATER_TRAFFIC_EVERY = 10;
    private static final Path DIR = Path.of("target", "bench-many");
    private static final List<String> ROCKSDB_PROPERTIES = List.of("cur-size-all-mem-tables",
            "estimate-table-readers-mem", "block-cache-usage", "block-cache-pinned-usage", "total-sst-files-size",
            "estimate-num-keys");

    /** Bench argument: every this many seconds of wall clock, a line of why experiments lag (0: never). */
    private static final String TRACE = "trace";
    /** Bench argument: seconds of wall clock without new events after the last period, traced. */
    private static final String SETTLE = "settle";

    private final int experiments;
    private final TopologySettings settings;
    private final long traceEveryMs;
    private final LagTrace trace;
    private final JobCounters counters = new JobCounters();
    private final TopologyTestDriver driver;
    private final TestInputTopic<byte[], byte[]> outcomes;
    private final Map<String, TestOutputTopic<byte[], byte[]>> outputs = new HashMap<>();
    private final SplittableRandom random = new SplittableRandom(2026);
    private long clock = T0;
    private long outputRecords;

    private ManyExperimentsBench(int experiments, TopologySettings settings, long traceEverySeconds) {
        this.experiments = experiments;
        this.settings = settings;
        this.traceEveryMs = traceEverySeconds * 1000;
        this.trace = traceEverySeconds > 0 ? new LagTrace(experiments) : null;
        Properties props = RunoffTopology.streamsConfig(settings, counters, Map.of(
                StreamsConfig.APPLICATION_ID_CONFIG, "bench-many",
                StreamsConfig.BOOTSTRAP_SERVERS_CONFIG, "ttd:9092",
                StreamsConfig.STATE_DIR_CONFIG, DIR.resolve("state").toString(),
                StreamsConfig.ROCKSDB_CONFIG_SETTER_CLASS_CONFIG, BoundedRocksDbConfig.class.getName()));
        driver = new TopologyTestDriver(RunoffTopology.build(settings, props, counters), props,
                Instant.ofEpochMilli(T0));
        ByteArraySerializer bytes = new ByteArraySerializer();
        outcomes = driver.createInputTopic(settings.outcomesTopic(), bytes, bytes);
    }

    /**
     * Runs the benchmark.
     *
     * @param args experiments (default 100000), recompute periods (default 3), then {@code runoff.key=value}
     *             job settings
     */
    public static void main(String[] args) throws IOException {
        int experiments = args.length > 0 ? Integer.parseInt(args[0]) : 100_000;
        int periods = args.length > 1 ? Integer.parseInt(args[1]) : 3;
        Map<String, String> overrides = new TreeMap<>();
        for (int i = 2; i < args.length; i++) {
            String[] pair = args[i].split("=", 2);
            if (pair.length != 2) {
                throw new IllegalArgumentException("setting " + args[i] + ": expected runoff.key=value, "
                        + TRACE + "=SECONDS or " + SETTLE + "=SECONDS");
            }
            overrides.put(pair[0], pair[1]);
        }
        long traceEvery = Long.parseLong(overrides.getOrDefault(TRACE, "0"));
        long settle = Long.parseLong(overrides.getOrDefault(SETTLE, "0"));
        overrides.remove(TRACE);
        overrides.remove(SETTLE);
        TopologySettings settings = TopologySettings.fromMap(overrides);
        Configurator.setLevel("dev.runoff", Level.WARN);
        delete(DIR);
        long heapBefore = heapAfterGc();
        System.out.printf(Locale.ROOT, "experiments=%d arms=%d periods=%d settings=%s cores=%d maxHeap=%d MiB%n",
                experiments, ARMS, periods, overrides, Runtime.getRuntime().availableProcessors(),
                Runtime.getRuntime().maxMemory() >> 20);
        ManyExperimentsBench bench = new ManyExperimentsBench(experiments, settings, traceEvery);
        try {
            bench.define();
            for (int period = 0; period < periods; period++) {
                bench.period(period);
            }
            bench.settle(settle);
            bench.memory(heapBefore);
        } finally {
            bench.driver.close();
        }
    }

    private void define() {
        RecordCodec<ExperimentDefinition> codec = RecordCodec.definitions();
        TestInputTopic<byte[], byte[]> definitions = driver.createInputTopic(settings.definitionsTopic(),
                new ByteArraySerializer(), new ByteArraySerializer());
        long began = System.nanoTime();
        for (int e = 0; e < experiments; e++) {
            ExperimentDefinition definition = definition(id(e));
            definitions.pipeInput(utf8(definition.getExperimentId()), codec.encode(definition), clock);
            if (e % 10_000 == 9_999) {
                drain();
            }
        }
        drain();
        System.out.printf(Locale.ROOT, "defined %d experiments in %.1f s (load %.2f)%n", experiments,
                seconds(began), load());
    }

    /** One recompute period: new units for every experiment, then the wall clock through the period. */
    private void period(int period) {
        long began = System.nanoTime();
        long start = clock;
        int events = traffic(period, period == 0 ? 1 : LATER_TRAFFIC_EVERY);
        System.out.printf(Locale.ROOT, "period %d: %d events in %.1f s (load %.2f)%n", period, events,
                seconds(began), load());
        List<Double> passMillis = new ArrayList<>();
        List<Long> perPass = new ArrayList<>();
        long recomputePeriod = definition(id(0)).getRecomputePeriodMs();
        long stepped = System.nanoTime();
        for (long done = 0; done < recomputePeriod; done += settings.allocateIntervalMs()) {
            long passes = counters.allocationPasses();
            long nanos = counters.allocationPassNanos();
            long decisions = counters.decisions();
            step();
            if (counters.allocationPasses() > passes) {
                passMillis.add((counters.allocationPassNanos() - nanos) / 1e6);
                perPass.add(counters.decisions() - decisions);
            }
        }
        Collections.sort(passMillis);
        Collections.sort(perPass);
        long decided = perPass.stream().mapToLong(Long::longValue).sum();
        System.out.printf(Locale.ROOT, "period %d: %d passes in %.1f s; pass ms median %.1f max %.1f; decisions %d"
                        + " (per pass median %d, max %d) (load %.2f)%n", period, passMillis.size(), seconds(stepped),
                median(passMillis), passMillis.isEmpty() ? 0 : passMillis.get(passMillis.size() - 1), decided,
                perPass.isEmpty() ? 0 : perPass.get(perPass.size() / 2),
                perPass.isEmpty() ? 0 : perPass.get(perPass.size() - 1), load());
        census("period " + period, start);
    }

    /** One step of the wall clock (one allocation interval), traced when asked. */
    private void step() {
        long folded = counters.foldedTrials();
        long decisions = counters.decisions();
        clock += settings.allocateIntervalMs();
        driver.advanceWallClockTime(Duration.ofMillis(settings.allocateIntervalMs()));
        drain();
        if (trace == null) {
            return;
        }
        KeyValueStore<String, ExperimentState> store = driver.getKeyValueStore(RunoffTopology.EXPERIMENTS_STORE);
        trace.step(store, clock);
        if ((clock - T0) % traceEveryMs == 0) {
            System.out.printf(Locale.ROOT, "  t=%ds folded trials %d, decisions %d in the last step; lagging: %s%n",
                    (clock - T0) / 1000, counters.foldedTrials() - folded, counters.decisions() - decisions,
                    trace.lagging(store, clock));
        }
    }

    /** {@code seconds} more of wall clock without new events (traced when asked), then a census. */
    private void settle(long seconds) {
        if (seconds <= 0) {
            return;
        }
        long start = clock;
        for (long done = 0; done < seconds * 1000; done += settings.allocateIntervalMs()) {
            step();
        }
        System.out.printf(Locale.ROOT, "settled %d s without new events%n", seconds);
        census("settled", start);
    }

    /** Five new units for every {@code every}-th experiment, one exposure per arm, a click on one in five. */
    private int traffic(int period, int every) {
        int events = 0;
        for (int e = 0; e < experiments; e += every) {
            for (int a = 0; a < ARMS; a++) {
                String unit = "u" + e + "-" + period + "-" + a;
                outcomes.pipeInput(utf8(unit), event(id(e), unit, unit + "x", "EXPOSURE", "arm" + a), clock);
                events++;
                if (random.nextDouble() < CLICK_RATE) {
                    outcomes.pipeInput(utf8(unit), event(id(e), unit, unit + "c", "CLICK", null), clock);
                    events++;
                }
            }
            if (e % 10_000 < every) {
                drain();
            }
        }
        drain();
        return events;
    }

    /** Reads the experiments store whole: evaluated in the period, never evaluated, lagging. */
    private void census(String when, long start) {
        KeyValueStore<String, ExperimentState> store = driver.getKeyValueStore(RunoffTopology.EXPERIMENTS_STORE);
        long held = 0;
        long evaluated = 0;
        long never = 0;
        long lagging = 0;
        long stopped = 0;
        try (KeyValueIterator<String, ExperimentState> all = store.all()) {
            while (all.hasNext()) {
                KeyValue<String, ExperimentState> next = all.next();
                ExperimentState state = next.value;
                held++;
                stopped += state.stopped() ? 1 : 0;
                evaluated += state.lastComputedAt() >= start ? 1 : 0;
                never += state.lastComputedAt() < 0 ? 1 : 0;
                lagging += Lagging.lagging(state, clock) ? 1 : 0;
            }
        }
        System.out.printf(Locale.ROOT, "%s end: held %d, stopped %d, evaluated this period %d, never"
                + " evaluated %d, lagging (stateless rule) %d%n", when, held, stopped, evaluated, never, lagging);
        if (trace != null) {
            System.out.printf(Locale.ROOT, "%s end: lagging: %s%n", when, trace.lagging(store, clock));
        }
    }

    private void memory(long heapBefore) throws IOException {
        long heap = heapAfterGc() - heapBefore;
        System.out.printf(Locale.ROOT, "heap after GC, less before the driver: %d MiB = %.0f B per experiment,"
                + " %.0f B per arm%n", heap >> 20, (double) heap / experiments, (double) heap / experiments / ARMS);
        Map<String, Double> totals = new TreeMap<>();
        double blockCache = 0;
        for (Map.Entry<MetricName, ? extends Metric> entry : driver.metrics().entrySet()) {
            MetricName name = entry.getKey();
            if (!ROCKSDB_PROPERTIES.contains(name.name()) || !(entry.getValue().metricValue() instanceof Number n)) {
                continue;
            }
            if (name.name().startsWith("block-cache")) {
                blockCache = Math.max(blockCache, n.doubleValue());
                totals.merge(name.name() + " (shared cache)", n.doubleValue(), Math::max);
            } else {
                totals.merge(name.name(), n.doubleValue(), Double::sum);
                String store = name.tags().entrySet().stream().filter(t -> t.getKey().endsWith("state-id"))
                        .map(Map.Entry::getValue).findFirst().orElse("?");
                totals.merge(name.name() + " [" + store + "]", n.doubleValue(), Double::sum);
            }
        }
        totals.forEach((key, value) -> System.out.printf(Locale.ROOT, "rocksdb %s: %.1f MiB = %.0f per experiment%n",
                key, value / (1 << 20), value / experiments));
        long disk = size(DIR.resolve("state"));
        System.out.printf(Locale.ROOT, "state directory: %d MiB = %.0f B per experiment, %.0f B per arm;"
                        + " output records %d; counters %s (load %.2f)%n", disk >> 20, (double) disk / experiments,
                (double) disk / experiments / ARMS, outputRecords, counters.snapshot(), load());
    }

    /** Reads every topic the topology wrote to, so the driver does not keep its output in memory. */
    private void drain() {
        for (String topic : driver.producedTopicNames()) {
            outputRecords += outputs.computeIfAbsent(topic, t -> driver.createOutputTopic(t,
                    new ByteArrayDeserializer(), new ByteArrayDeserializer())).readRecordsToList().size();
        }
    }

    private static ExperimentDefinition definition(String id) {
        List<String> arms = new ArrayList<>();
        for (int a = 0; a < ARMS; a++) {
            arms.add("arm" + a);
        }
        return ExperimentDefinition.newBuilder().setExperimentId(id).setArms(arms)
                .setMetric(MetricSpec.newBuilder().setKind(MetricKind.BERNOULLI).setSuccessEvent(EventType.CLICK)
                        .build())
                .setAllocation(AllocationSpec.newBuilder().build()).setStopping(StoppingSpec.newBuilder().build())
                .setAttributionWindowMs(WINDOW_MS).build();
    }

    private static String id(int e) {
        return String.format(Locale.ROOT, "exp-%06d", e);
    }

    private byte[] event(String experiment, String unit, String eventId, String type, String arm) {
        String json = "{\"experimentId\":\"" + experiment + "\",\"unitId\":\"" + unit + "\",\"eventId\":\"" + eventId
                + "\",\"type\":\"" + type + "\",\"timestamp\":" + clock + (arm == null ? "" : ",\"arm\":\"" + arm
                + "\"") + "}";
        return utf8(json);
    }

    private static byte[] utf8(String text) {
        return text.getBytes(StandardCharsets.UTF_8);
    }

    private static double median(List<Double> sorted) {
        return sorted.isEmpty() ? 0 : sorted.get(sorted.size() / 2);
    }

    private static double seconds(long sinceNanos) {
        return (System.nanoTime() - sinceNanos) / 1e9;
    }

    private static double load() {
        return ManagementFactory.getOperatingSystemMXBean().getSystemLoadAverage();
    }

    private static long heapAfterGc() {
        for (int i = 0; i < 3; i++) {
            System.gc();
        }
        return ManagementFactory.getMemoryMXBean().getHeapMemoryUsage().getUsed();
    }

    private static long size(Path dir) throws IOException {
        if (!Files.exists(dir)) {
            return 0;
        }
        try (Stream<Path> files = Files.walk(dir)) {
            return files.filter(Files::isRegularFile).mapToLong(f -> {
                try {
                    return Files.size(f);
                } catch (IOException e) {
                    throw new UncheckedIOException(e);
                }
            }).sum();
        }
    }

    private static void delete(Path dir) throws IOException {
        if (!Files.exists(dir)) {
            return;
        }
        try (Stream<Path> paths = Files.walk(dir)) {
            for (Path p : paths.sorted(Collections.reverseOrder()).toList()) {
                Files.delete(p);
            }
        }
    }
}
