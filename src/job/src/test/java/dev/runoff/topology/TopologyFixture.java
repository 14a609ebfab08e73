package dev.runoff.topology;

import dev.runoff.decision.ExperimentState;

import dev.runoff.records.Decoded;
import dev.runoff.records.RecordCodec;
import dev.runoff.records.RecordSigner;
import dev.runoff.records.avro.AllocationUpdate;
import dev.runoff.records.avro.DecisionRecord;
import dev.runoff.records.avro.ExperimentDefinition;
import java.nio.charset.StandardCharsets;
import java.nio.file.Path;
import java.time.Duration;
import java.time.Instant;
import java.util.ArrayList;
import java.util.List;
import java.util.Map;
import java.util.Properties;
import java.util.UUID;
import org.apache.kafka.common.serialization.ByteArrayDeserializer;
import org.apache.kafka.common.serialization.ByteArraySerializer;
import org.apache.kafka.common.serialization.StringDeserializer;
import org.apache.kafka.streams.StreamsConfig;
import org.apache.kafka.streams.TopologyTestDriver;
import org.apache.kafka.streams.state.KeyValueStore;
import org.apache.kafka.streams.state.WindowStore;
import org.apache.kafka.streams.test.TestRecord;
import org.apache.kafka.streams.TestInputTopic;
import org.apache.kafka.streams.TestOutputTopic;

/**
 * The job under a {@link TopologyTestDriver} whose wall clock starts at {@link #T0}: inputs by topic, outputs
 * decoded and checked with the records package, and the experiments store.
 */
final class TopologyFixture implements AutoCloseable {

    /** 2023-11-14T22:13:20Z, the driver's initial wall-clock time. */
    static final long T0 = 1_700_000_000_000L;

    /**
     * Settings of the tests: 100 ms flush and allocation periods, 1 h deduplication window, windows closed by
     * the wall clock alone 200 ms after the last event was read (the tests send events at the wall clock).
     */
    static final TopologySettings SETTINGS = TopologySettings.fromMap(Map.of(
            TopologySettings.FLUSH_INTERVAL_KEY, 100, TopologySettings.ALLOCATE_INTERVAL_KEY, 100,
            TopologySettings.DEDUPE_WINDOW_KEY, 3_600_000, TopologySettings.UNITS_CLOSE_IDLE_KEY, 200));

    /** One codec per record type for every fixture: building a codec parses schemas. */
    private static final RecordCodec<ExperimentDefinition> DEFINITIONS = RecordCodec.definitions();
    private static final RecordCodec<DecisionRecord> DECISIONS = RecordCodec.decisionRecords();
    private static final RecordCodec<AllocationUpdate> ALLOCATIONS = RecordCodec.allocationUpdates();

    private final TopologySettings settings;
    private final JobCounters counters = new JobCounters();
    private final TopologyTestDriver driver;
    private final TestInputTopic<byte[], byte[]> outcomes;
    private final TestInputTopic<byte[], byte[]> experiments;
    private final TestOutputTopic<String, byte[]> allocations;
    private final TestOutputTopic<String, byte[]> decisions;
    private final TestOutputTopic<String, byte[]> rejected;
    private final TestOutputTopic<String, byte[]> accepted;
    private long clock = T0;

    TopologyFixture() {
        this(SETTINGS);
    }

    TopologyFixture(TopologySettings settings) {
        this(settings, RecordSigner.unsigned());
    }

    /** A job signing its decision and control records with {@code signer}. */
    TopologyFixture(TopologySettings settings, RecordSigner signer) {
        this.settings = settings;
        Properties props = driverConfig(settings, counters, "runoff-ttd");
        driver = new TopologyTestDriver(RunoffTopology.build(settings, props, counters, System::nanoTime, signer),
                props, Instant.ofEpochMilli(T0));
        ByteArraySerializer bytes = new ByteArraySerializer();
        outcomes = driver.createInputTopic(settings.outcomesTopic(), bytes, bytes, Instant.ofEpochMilli(T0),
                Duration.ZERO);
        experiments = driver.createInputTopic(settings.definitionsTopic(), bytes, bytes, Instant.ofEpochMilli(T0),
                Duration.ZERO);
        StringDeserializer keys = new StringDeserializer();
        ByteArrayDeserializer values = new ByteArrayDeserializer();
        allocations = driver.createOutputTopic(settings.allocationsTopic(), keys, values);
        decisions = driver.createOutputTopic(settings.decisionsTopic(), keys, values);
        rejected = driver.createOutputTopic(settings.rejectedTopic(), keys, values);
        accepted = driver.createOutputTopic(settings.acceptedDefinitionsTopic(), keys, values);
    }

    /** The job's streams settings for a test driver, with a fresh state directory under {@code target/}. */
    static Properties driverConfig(TopologySettings settings, JobCounters counters, String application) {
        return RunoffTopology.streamsConfig(settings, counters, Map.of(
                StreamsConfig.APPLICATION_ID_CONFIG, application,
                StreamsConfig.BOOTSTRAP_SERVERS_CONFIG, "ttd:9092",
                StreamsConfig.STATE_DIR_CONFIG, Path.of("target", "ttd-state", UUID.randomUUID().toString())
                        .toString()));
    }

    JobCounters counters() {
        return counters;
    }

    /** Submits {@code definition} keyed by its id, in Avro single-object encoding, at the current time. */
    void define(ExperimentDefinition definition) {
        experiments.pipeInput(utf8(definition.getExperimentId()), DEFINITIONS.encode(definition),
                clock);
    }

    /** Submits raw bytes on the definitions topic. */
    void defineRaw(byte[] key, byte[] value) {
        experiments.pipeInput(key, value, clock);
    }

    /** Deletes the definition of {@code id}. */
    void end(String id) {
        experiments.pipeInput(utf8(id), null, clock);
    }

    /** Sends one outcome record keyed by {@code key}, its record timestamp the current wall clock. */
    void event(String key, byte[] value) {
        event(key, value, clock);
    }

    /**
     * Sends one outcome record keyed by {@code key} with record timestamp {@code recordTimestamp}: a record
     * produced then and read only now, as by a job lagging behind its input.
     */
    void event(String key, byte[] value, long recordTimestamp) {
        outcomes.pipeInput(key == null ? null : utf8(key), value, recordTimestamp);
    }

    /** Advances the wall clock by {@code millis} in steps of 50 ms, so every punctuation fires on time. */
    void advance(long millis) {
        for (long done = 0; done < millis; done += 50) {
            long step = Math.min(50, millis - done);
            clock += step;
            driver.advanceWallClockTime(Duration.ofMillis(step));
        }
    }

    /** An input of raw bytes for any source topic of the topology, internal repartition topics included. */
    TestInputTopic<byte[], byte[]> rawInput(String topic) {
        return driver.createInputTopic(topic, new ByteArraySerializer(), new ByteArraySerializer());
    }

    /** The current wall-clock time of the driver. */
    long clock() {
        return clock;
    }

    /** Decision records published since the last call, each checked valid by the records package. */
    List<DecisionRecord> decisions() {
        return decode(decisions, DECISIONS);
    }

    /** Control records published since the last call (tombstones as {@code null}), each checked valid. */
    List<AllocationUpdate> allocations() {
        return decode(allocations, ALLOCATIONS);
    }

    /** Raw control records since the last call. */
    List<TestRecord<String, byte[]>> allocationRecords() {
        return allocations.readRecordsToList();
    }

    /** Accepted definitions since the last call (tombstones as {@code null}). */
    List<ExperimentDefinition> accepted() {
        return decode(accepted, DEFINITIONS);
    }

    /** Rejected records since the last call. */
    List<TestRecord<String, byte[]>> rejected() {
        return rejected.readRecordsToList();
    }

    /** The state the job holds for {@code id}, or {@code null}. */
    ExperimentState state(String id) {
        KeyValueStore<String, ExperimentState> store = driver.getKeyValueStore(RunoffTopology.EXPERIMENTS_STORE);
        return store.get(id);
    }

    /** The job's key-value store {@code name}, to read or to seed with entries an earlier version wrote. */
    <K, V> KeyValueStore<K, V> store(String name) {
        return driver.getKeyValueStore(name);
    }

    /** The job's window store {@code name}, to read or to seed with entries an earlier version wrote. */
    WindowStore<String, byte[]> windowStore(String name) {
        return driver.getWindowStore(name);
    }

    private <T extends org.apache.avro.specific.SpecificRecord> List<T> decode(TestOutputTopic<String, byte[]> topic,
                                                                             RecordCodec<T> codec) {
        List<T> out = new ArrayList<>();
        for (TestRecord<String, byte[]> record : topic.readRecordsToList()) {
            if (record.value() == null) {
                out.add(null);
                continue;
            }
            Decoded<T> decoded = codec.decode(record.value(), record.timestamp());
            if (!decoded.isValid()) {
                throw new AssertionError("invalid output on key " + record.key() + ": " + decoded.problems());
            }
            out.add(decoded.orThrow());
        }
        return out;
    }

    static String header(TestRecord<?, ?> record, String name) {
        var header = record.headers().lastHeader(name);
        return header == null ? null : new String(header.value(), StandardCharsets.UTF_8);
    }

    static byte[] utf8(String text) {
        return text.getBytes(StandardCharsets.UTF_8);
    }

    @Override
    public void close() {
        driver.close();
    }
}
