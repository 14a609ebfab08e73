package dev.runoff.serving;

import static org.junit.jupiter.api.Assertions.assertAll;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.runoff.broker.EmbeddedKafkaBroker;
import dev.runoff.client.AllocationTable;
import dev.runoff.client.ArmAssignment;
import dev.runoff.client.ControlTopicFollower;
import dev.runoff.client.OutcomeReporter;
import dev.runoff.client.PickPolicy;
import dev.runoff.client.StickyAssigner;
import dev.runoff.client.UnitPseudonymizer;
import dev.runoff.records.RecordCodec;
import dev.runoff.records.avro.AllocationUpdate;
import dev.runoff.records.avro.ArmState;
import dev.runoff.records.avro.ArmWeight;
import dev.runoff.records.avro.DecisionRecord;
import dev.runoff.records.avro.EventType;
import dev.runoff.records.avro.ExperimentDefinition;
import dev.runoff.records.avro.MetricKind;
import dev.runoff.records.avro.MetricSpec;
import dev.runoff.records.avro.StoppingSpec;
import dev.runoff.testkit.Await;
import dev.runoff.testkit.Directories;
import dev.runoff.testkit.TestDefinitions;
import dev.runoff.topology.JobCounters;
import dev.runoff.topology.RunoffTopology;
import dev.runoff.topology.TopologySettings;
import java.nio.charset.StandardCharsets;
import java.nio.file.Path;
import java.time.Clock;
import java.time.Duration;
import java.time.Instant;
import java.time.ZoneOffset;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.Comparator;
import java.util.HashMap;
import java.util.List;
import java.util.Map;
import java.util.PriorityQueue;
import java.util.Properties;
import org.apache.commons.rng.UniformRandomProvider;
import org.apache.commons.rng.simple.RandomSource;
import org.apache.kafka.clients.consumer.ConsumerConfig;
import org.apache.kafka.clients.consumer.ConsumerRecord;
import org.apache.kafka.clients.consumer.KafkaConsumer;
import org.apache.kafka.clients.producer.KafkaProducer;
import org.apache.kafka.clients.producer.ProducerConfig;
import org.apache.kafka.common.TopicPartition;
import org.apache.kafka.common.serialization.ByteArrayDeserializer;
import org.apache.kafka.common.serialization.ByteArraySerializer;
import org.apache.kafka.common.serialization.StringDeserializer;
import org.apache.kafka.common.serialization.StringSerializer;
import org.apache.kafka.streams.KafkaStreams;
import org.apache.kafka.streams.StreamsConfig;
import org.junit.jupiter.api.AfterAll;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.function.Executable;

/**
 * The real topology on the in-JVM broker, served by the client library (control-topic follower, table, sticky
 * assigner, outcome reporter): a seeded population in which 30% of visits are by units that came before,
 * served across at least 50 recomputes while the weights move. No returning unit is served another arm while
 * its arm has weight, and once every unit's window has closed the last decision counts, per arm, exactly the
 * units and the converted units that this test computes from what it sent.
 */
class ReturningUnitsKeepTheirArmAndCountOnceIT {

    private static final String EXPERIMENT = "returning-units";
    private static final List<String> ARMS = List.of("a", "b", "c");
    private static final double[] RATES = {0.10, 0.13, 0.16};
    private static final double RETURNING = 0.30;
    /** Recompute period: the shortest a definition may have (Definitions.MIN_RECOMPUTE_PERIOD_MS). */
    private static final long RECOMPUTE_MS = 1_000;
    private static final int RECOMPUTES = 50;
    /**
     * Conversion window. Conversions inside it come at most {@link #IN_WINDOW_MS} after the exposure, those
     * outside at least {@link #OUT_OF_WINDOW_MS}: the gap either side leaves the job seconds of lag before a
     * conversion stamped inside the window could be read after the window closed on its clock.
     */
    private static final long WINDOW_MS = 4_000;
    private static final long IN_WINDOW_MS = 500;
    private static final long OUT_OF_WINDOW_MS = 5_000;
    private static final int VISITS_PER_TICK = 20;
    private static final long TICK_MS = 100;
    private static final Duration WAIT = Duration.ofSeconds(120);
    private static final TopologySettings SETTINGS = TopologySettings.fromMap(Map.of(
            TopologySettings.FLUSH_INTERVAL_KEY, 100, TopologySettings.ALLOCATE_INTERVAL_KEY, 100));

    private static Path dir;
    private static EmbeddedKafkaBroker broker;
    private static KafkaStreams streams;
    private static final JobCounters COUNTERS = new JobCounters();

    @BeforeAll
    static void startJob() {
        dir = Directories.fresh("returning-units");
        broker = EmbeddedKafkaBroker.builder(dir.resolve("broker")).build().start();
        for (String topic : List.of(SETTINGS.outcomesTopic(), SETTINGS.definitionsTopic(),
                SETTINGS.acceptedDefinitionsTopic(), SETTINGS.allocationsTopic(), SETTINGS.decisionsTopic(),
                SETTINGS.rejectedTopic())) {
            broker.createTopic(topic, 2, Map.of());
        }
        Properties props = RunoffTopology.streamsConfig(SETTINGS, COUNTERS, Map.of(
                StreamsConfig.APPLICATION_ID_CONFIG, "returning-units",
                StreamsConfig.BOOTSTRAP_SERVERS_CONFIG, broker.bootstrapServers(),
                StreamsConfig.STATE_DIR_CONFIG, dir.resolve("state").toAbsolutePath().toString()));
        streams = new KafkaStreams(RunoffTopology.build(SETTINGS, props, COUNTERS), props);
        streams.start();
        Await.until("the job RUNNING", WAIT, () -> streams.state() == KafkaStreams.State.RUNNING);
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

    /** The definition: unit counting (the default), conversions as successes, no STOP within the test. */
    private static ExperimentDefinition definition() {
        ExperimentDefinition def = TestDefinitions.withWindow(
                TestDefinitions.bernoulli(EXPERIMENT, ARMS.toArray(String[]::new)), WINDOW_MS);
        def.setMetric(MetricSpec.newBuilder().setKind(MetricKind.BERNOULLI).setTrialEvent(EventType.EXPOSURE)
                .setSuccessEvent(EventType.CONVERSION).build());
        // far more trials per arm than the test sends: the weights adapt, the stopping rule never runs
        def.setStopping(StoppingSpec.newBuilder(def.getStopping()).setMinTrialsPerArm(1_000_000).build());
        def.setRecomputePeriodMs(RECOMPUTE_MS);
        return def;
    }

    @Test
    void returningUnitsNeverSwitchWhileTheirArmHasWeightAndTheLastDecisionCountsTheTruth() throws Exception {
        Truth truth = new Truth();
        List<DecisionRecord> decisions = new ArrayList<>();
        try (Serving serving = new Serving(); KafkaConsumer<String, byte[]> consumer = decisionsConsumer()) {
            serving.define(definition());
            Await.until("weights in the serving table", WAIT, serving::ready);
            serving.run(truth, () -> read(consumer, decisions) >= RECOMPUTES);
            Await.until("a decision counting every unit with none pending", WAIT, () -> {
                if (read(consumer, decisions) == 0) {
                    return false;
                }
                DecisionRecord last = decisions.get(decisions.size() - 1);
                return trials(last) >= truth.units() && pending(last) == 0;
            });
        }
        assertTrue(truth.returningVisits > 0.25 * truth.visits, "returning visits " + truth.returningVisits + " of "
                + truth.visits);
        assertTrue(truth.weightChangesSeenByReturningUnits > 0, "the weights moved under returning units");
        assertTrue(decisions.size() >= RECOMPUTES, decisions.size() + " decisions");
        DecisionRecord last = decisions.get(decisions.size() - 1);
        String context = "job counters " + COUNTERS.snapshot() + "; truth units " + Arrays.toString(truth.units)
                + " converted " + Arrays.toString(truth.converted());
        List<Executable> checks = new ArrayList<>();
        checks.add(() -> assertEquals(0, truth.switchedWhileWeighted, "returning units served another arm while"
                + " theirs had weight (of " + truth.returningVisits + " returning visits)"));
        for (int i = 0; i < ARMS.size(); i++) {
            ArmState arm = last.getArms().get(i);
            String name = ARMS.get(i);
            long units = truth.units[i];
            long converted = truth.converted()[i];
            checks.add(() -> assertEquals(name, arm.getArm()));
            checks.add(() -> assertEquals(units, arm.getTrials(), "units of arm " + name + "; " + context));
            checks.add(() -> assertEquals(converted, (long) arm.getSuccesses(), "converted units of arm " + name
                    + "; " + context));
        }
        assertAll(checks);
        assertTrue(truth.outOfWindow > 0 && truth.converted()[0] > 0, "conversions on both sides of the window");
    }

    private static long trials(DecisionRecord d) {
        return d.getArms().stream().mapToLong(ArmState::getTrials).sum();
    }

    private static long pending(DecisionRecord d) {
        return d.getArms().stream().mapToLong(a -> a.getPending() == null ? 0 : a.getPending()).sum();
    }

    /** Reads what arrived; returns how many decisions were read so far. */
    private static int read(KafkaConsumer<String, byte[]> consumer, List<DecisionRecord> into) {
        for (ConsumerRecord<String, byte[]> r : consumer.poll(Duration.ofMillis(10))) {
            if (EXPERIMENT.equals(r.key())) {
                into.add(RecordCodec.decisionRecords().decode(r.value(), 0).orThrow());
            }
        }
        return into.size();
    }

    private static KafkaConsumer<String, byte[]> decisionsConsumer() {
        Properties props = new Properties();
        props.put(ConsumerConfig.BOOTSTRAP_SERVERS_CONFIG, broker.bootstrapServers());
        props.put(ConsumerConfig.ISOLATION_LEVEL_CONFIG, "read_committed");
        KafkaConsumer<String, byte[]> consumer = new KafkaConsumer<>(props, new StringDeserializer(),
                new ByteArrayDeserializer());
        List<TopicPartition> partitions = consumer.partitionsFor(SETTINGS.decisionsTopic()).stream()
                .map(p -> new TopicPartition(p.topic(), p.partition())).toList();
        consumer.assign(partitions);
        consumer.seekToBeginning(partitions);
        return consumer;
    }

    /** What the test sent, and what it expects the job to count, computed from the sent events alone. */
    private static final class Truth {
        final long[] units = new long[ARMS.size()];
        final Map<String, Integer> firstArm = new HashMap<>();
        final Map<String, Long> firstStamp = new HashMap<>();
        final Map<String, String> lastArm = new HashMap<>();
        final Map<String, Boolean> convertedInWindow = new HashMap<>();
        long visits;
        long returningVisits;
        long switchedWhileWeighted;
        long weightChangesSeenByReturningUnits;
        long outOfWindow;
        private final Map<String, Long> lastSequence = new HashMap<>();

        long units() {
            return Arrays.stream(units).sum();
        }

        /** A visit of {@code unit}, served {@code arm} from {@code record}, stamped {@code stamp}. */
        void exposed(String unit, String arm, AllocationUpdate record, long stamp) {
            visits++;
            String previous = lastArm.put(unit, arm);
            if (previous == null) {
                units[ARMS.indexOf(arm)]++;
                firstArm.put(unit, ARMS.indexOf(arm));
                firstStamp.put(unit, stamp);
            } else {
                returningVisits++;
                if (!previous.equals(arm) && weight(record, previous) > 0) {
                    switchedWhileWeighted++;
                }
                if (lastSequence.get(unit) != record.getSequence()) {
                    weightChangesSeenByReturningUnits++;
                }
            }
            lastSequence.put(unit, record.getSequence());
        }

        /**
         * A conversion of {@code unit} reported with {@code arm}, stamped {@code stamp}: the unit converts if the
         * arm is its first one (the job rejects others) and the stamp is at most the window after its first
         * exposure (the definition's rule, ExperimentDefinition.attributionWindowMs).
         */
        void converted(String unit, String arm, long stamp) {
            boolean inWindow = stamp - firstStamp.get(unit) <= WINDOW_MS;
            if (!inWindow) {
                outOfWindow++;
            }
            if (inWindow && ARMS.indexOf(arm) == firstArm.get(unit)) {
                convertedInWindow.put(unit, true);
            }
        }

        long[] converted() {
            long[] c = new long[ARMS.size()];
            convertedInWindow.keySet().forEach(u -> c[firstArm.get(u)]++);
            return c;
        }

        private static double weight(AllocationUpdate record, String arm) {
            return record.getWeights().stream().filter(w -> w.getArm().equals(arm))
                    .mapToDouble(ArmWeight::getWeight).findFirst().orElse(0.0);
        }
    }

    /** A clock the test sets before each event, so that it knows every event's timestamp. */
    private static final class StampClock extends Clock {
        private volatile long millis;

        long stamp() {
            millis = System.currentTimeMillis();
            return millis;
        }

        @Override
        public long millis() {
            return millis;
        }

        @Override
        public Instant instant() {
            return Instant.ofEpochMilli(millis);
        }

        @Override
        public java.time.ZoneId getZone() {
            return ZoneOffset.UTC;
        }

        @Override
        public Clock withZone(java.time.ZoneId zone) {
            throw new UnsupportedOperationException("fixed zone");
        }
    }

    /** The serving tier: the client library, fed seeded visits. */
    private static final class Serving implements AutoCloseable {
        private record Due(long at, ArmAssignment served, String eventId) {
        }

        private final UniformRandomProvider rng = RandomSource.XO_RO_SHI_RO_128_PP.create(2026);
        private final StampClock stamps = new StampClock();
        private final AllocationTable table = AllocationTable.create(PickPolicy.builder("none").build(),
                Clock.systemUTC());
        private final StickyAssigner sticky = StickyAssigner.over(table, 1_000_000);
        private final ControlTopicFollower follower;
        private final KafkaProducer<String, byte[]> producer;
        private final OutcomeReporter reporter;
        private final PriorityQueue<Due> due = new PriorityQueue<>(Comparator.comparingLong(Due::at));
        private long units;
        private long events;

        Serving() {
            follower = ControlTopicFollower.builder(table, broker.bootstrapServers())
                    .topic(SETTINGS.allocationsTopic()).pollTimeout(Duration.ofMillis(50)).start();
            Properties props = new Properties();
            props.put(ProducerConfig.BOOTSTRAP_SERVERS_CONFIG, broker.bootstrapServers());
            props.put(ProducerConfig.LINGER_MS_CONFIG, "5");
            producer = new KafkaProducer<>(props, new StringSerializer(), new ByteArraySerializer());
            byte[] key = new byte[UnitPseudonymizer.MIN_KEY_BYTES];
            rng.nextBytes(key);
            reporter = OutcomeReporter.builder(producer, UnitPseudonymizer.withKey(key))
                    .topic(SETTINGS.outcomesTopic()).clock(stamps).build();
        }

        void define(ExperimentDefinition def) throws Exception {
            try (KafkaProducer<byte[], byte[]> p = new KafkaProducer<>(Map.of(
                    ProducerConfig.BOOTSTRAP_SERVERS_CONFIG, broker.bootstrapServers()), new ByteArraySerializer(),
                    new ByteArraySerializer())) {
                p.send(new org.apache.kafka.clients.producer.ProducerRecord<>(SETTINGS.definitionsTopic(),
                        EXPERIMENT.getBytes(StandardCharsets.UTF_8), RecordCodec.definitions().encode(def))).get();
            }
        }

        boolean ready() {
            return table.contains(EXPERIMENT);
        }

        /** Serves {@link #VISITS_PER_TICK} visits every {@link #TICK_MS} until {@code done}, sending conversions when due. */
        void run(Truth truth, java.util.function.BooleanSupplier done) throws InterruptedException {
            long deadline = System.currentTimeMillis() + WAIT.toMillis();
            while (!done.getAsBoolean()) {
                assertTrue(System.currentTimeMillis() < deadline, "fewer than " + RECOMPUTES + " decisions in " + WAIT);
                for (int i = 0; i < VISITS_PER_TICK; i++) {
                    visit(truth);
                }
                long tickEnd = System.currentTimeMillis() + TICK_MS;
                while (System.currentTimeMillis() < tickEnd) {
                    sendDue(truth, System.currentTimeMillis());
                    Thread.sleep(5);
                }
            }
            while (!due.isEmpty()) {
                Thread.sleep(Math.max(0, due.peek().at() - System.currentTimeMillis()));
                sendDue(truth, System.currentTimeMillis());
            }
            producer.flush();
        }

        private void visit(Truth truth) {
            boolean returning = units > 0 && rng.nextDouble() < RETURNING;
            String unit = "unit-" + (returning ? 1 + rng.nextLong(units) : ++units);
            AllocationUpdate record;
            ArmAssignment served;
            do {
                record = table.current(EXPERIMENT).orElseThrow();
                served = sticky.assign(EXPERIMENT, unit);
            } while (table.current(EXPERIMENT).orElseThrow().getSequence() != record.getSequence());
            long stamp = stamps.stamp();
            reporter.exposure(served, "e" + ++events);
            truth.exposed(unit, served.arm(), record, stamp);
            // only first visits convert: seeded, at the arm's rate, inside or well outside the window
            if (!returning && rng.nextDouble() < RATES[ARMS.indexOf(served.arm())]) {
                long delay = rng.nextDouble() < 0.8 ? rng.nextLong(IN_WINDOW_MS)
                        : OUT_OF_WINDOW_MS + rng.nextLong(1_000);
                due.add(new Due(stamp + delay, served, "c" + ++events));
            }
        }

        private void sendDue(Truth truth, long now) {
            while (!due.isEmpty() && due.peek().at() <= now) {
                Due d = due.poll();
                long stamp = stamps.stamp();
                reporter.outcome(d.served(), d.eventId(), EventType.CONVERSION, null);
                truth.converted(d.served().unitKey(), d.served().arm(), stamp);
            }
        }

        @Override
        public void close() {
            follower.close();
            producer.close(Duration.ofSeconds(10));
        }
    }
}
