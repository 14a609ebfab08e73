package dev.runoff.demo;

import dev.runoff.client.AllocationTable;
import dev.runoff.client.ArmAssignment;
import dev.runoff.client.ControlTopicFollower;
import dev.runoff.client.OutcomeReporter;
import dev.runoff.client.PickPolicy;
import dev.runoff.client.StickyAssigner;
import dev.runoff.client.UnitPseudonymizer;
import dev.runoff.job.JobConfig;
import dev.runoff.records.avro.AllocationUpdate;
import dev.runoff.records.avro.ArmWeight;
import dev.runoff.records.avro.EventType;
import java.time.Clock;
import java.time.Duration;
import java.util.Comparator;
import java.util.HashMap;
import java.util.List;
import java.util.Map;
import java.util.PriorityQueue;
import java.util.Properties;
import org.apache.kafka.clients.consumer.ConsumerConfig;
import org.apache.kafka.clients.producer.KafkaProducer;
import org.apache.kafka.clients.producer.ProducerConfig;
import org.apache.kafka.common.serialization.ByteArraySerializer;
import org.apache.kafka.common.serialization.StringSerializer;

/**
 * The demo's serving tier, built on the client library as a real one would be: an {@link AllocationTable} kept
 * up to date by a {@link ControlTopicFollower}, picks by a {@link StickyAssigner} in front of it (a returning
 * visitor keeps the layout while it has weight), and an {@link OutcomeReporter} that sends every exposure and
 * every booking with the layout served. Bookings wait in a queue until their delay has passed.
 *
 * <p>It also counts, from what the table actually served, the returning visits that got another layout than
 * the visitor's previous one while that previous layout still had weight in the control record the pick was
 * made from: sticky assignment promises 0.
 */
final class DemoServingTier implements AutoCloseable {

    private static final String NO_EXPERIMENT = "no-experiment";
    private static final Duration FOLLOWER_POLL = Duration.ofMillis(50);
    /** Units the sticky assigner remembers: more than a demo serves. */
    private static final int REMEMBERED_UNITS = 2_000_000;

    private record Booking(long dueAt, ArmAssignment served, String eventId, String signal) {
    }

    private final String experimentId;
    private final List<String> arms;
    private final TrafficGenerator visitors;
    private final Clock clock;
    private final AllocationTable table;
    private final StickyAssigner sticky;
    private final ControlTopicFollower follower;
    private final KafkaProducer<String, byte[]> producer;
    private final OutcomeReporter reporter;
    private final Map<String, String> lastArm = new HashMap<>();
    private final PriorityQueue<Booking> bookings = new PriorityQueue<>(Comparator.comparingLong(Booking::dueAt));
    private long switchedWhileWeighted;
    private long bookingsSent;
    private long failuresSent;

    /**
     * Starts following the control topic of {@code config} (returns once caught up) and opens the producer.
     *
     * @param arms          the experiment's arms, in the order of the generator's rates
     * @param pseudonymKey  key of the unit pseudonyms (at least {@link UnitPseudonymizer#MIN_KEY_BYTES} bytes)
     */
    DemoServingTier(JobConfig config, String experimentId, List<String> arms, TrafficGenerator visitors, Clock clock,
                    byte[] pseudonymKey) {
        this.experimentId = experimentId;
        this.arms = List.copyOf(arms);
        this.visitors = visitors;
        this.clock = clock;
        this.table = AllocationTable.create(PickPolicy.builder(NO_EXPERIMENT).build(), clock);
        this.sticky = StickyAssigner.over(table, REMEMBERED_UNITS);
        this.follower = ControlTopicFollower.builder(table, bootstrap(config))
                .topic(config.topology().allocationsTopic()).pollTimeout(FOLLOWER_POLL).start();
        Properties props = config.clientProperties(JobConfig.Client.PRODUCER);
        props.put(ProducerConfig.ACKS_CONFIG, "all");
        props.put(ProducerConfig.LINGER_MS_CONFIG, "5");
        this.producer = new KafkaProducer<>(props, new StringSerializer(), new ByteArraySerializer());
        this.reporter = OutcomeReporter.builder(producer, UnitPseudonymizer.withKey(pseudonymKey))
                .topic(config.topology().outcomesTopic()).clock(clock).build();
    }

    private static String bootstrap(JobConfig config) {
        return config.clientProperties(JobConfig.Client.CONSUMER).getProperty(ConsumerConfig.BOOTSTRAP_SERVERS_CONFIG);
    }

    /** True once the table holds a control record of the experiment. */
    boolean ready() {
        return table.contains(experimentId);
    }

    /** Serves {@code count} visits now: picks, exposures, and the bookings they lead to queued. */
    void serve(int count) {
        for (int i = 0; i < count; i++) {
            serve(visitors.nextVisit());
        }
        producer.flush();
    }

    private void serve(TrafficGenerator.Visit visit) {
        AllocationUpdate record;
        ArmAssignment served;
        do {
            record = table.current(experimentId).orElseThrow(
                    () -> new IllegalStateException("no control record of " + experimentId + " to serve from"));
            served = sticky.assign(experimentId, visit.unit());
        } while (changedSince(record));
        String previous = lastArm.put(visit.unit(), served.arm());
        if (previous != null && !previous.equals(served.arm()) && weight(record, previous) > 0) {
            switchedWhileWeighted++;
        }
        long visitNumber = visitors.visits();
        reporter.exposure(served, "visit-" + visitNumber);
        long delay = visitors.bookingDelay(visit, arms.indexOf(served.arm()));
        if (delay >= 0) {
            bookings.add(new Booking(clock.millis() + delay, served, "booking-" + visitNumber, null));
        }
        long failure = visitors.failureDelay(visit, arms.indexOf(served.arm()));
        if (failure >= 0) {
            bookings.add(new Booking(clock.millis() + failure, served, "payment-" + visitNumber,
                    DemoScenario.SIGNAL));
        }
    }

    /** Whether the table moved past {@code record} while a pick was made (the pick is then made again). */
    private boolean changedSince(AllocationUpdate record) {
        return table.current(experimentId).map(r -> r.getSequence() != record.getSequence()).orElse(true);
    }

    private static double weight(AllocationUpdate record, String arm) {
        return record.getWeights().stream().filter(w -> w.getArm().equals(arm)).mapToDouble(ArmWeight::getWeight)
                .findFirst().orElse(0.0);
    }

    /** Sends the bookings whose delay has passed, stamped now. */
    void sendDue() {
        long now = clock.millis();
        boolean sent = false;
        while (!bookings.isEmpty() && bookings.peek().dueAt() <= now) {
            Booking b = bookings.poll();
            if (b.signal() != null) {
                reporter.signal(b.served(), b.eventId(), b.signal());
                failuresSent++;
            } else {
                reporter.outcome(b.served(), b.eventId(), EventType.CONVERSION, null);
                bookingsSent++;
            }
            sent = true;
        }
        if (sent) {
            producer.flush();
        }
    }

    /** Returning visits served another layout than before while their previous layout still had weight. */
    long switchedWhileWeighted() {
        return switchedWhileWeighted;
    }

    /** Picks where the sticky assigner kept a returning visitor on a layout the table alone would have changed. */
    long keptPicks() {
        return sticky.keptPicks();
    }

    /** Failed payments sent so far (queued ones not yet due are not). */
    long failuresSent() {
        return failuresSent;
    }

    /** Bookings sent so far (queued ones not yet due are not). */
    long bookingsSent() {
        return bookingsSent;
    }

    @Override
    public void close() {
        follower.close();
        producer.close(Duration.ofSeconds(5));
    }
}
