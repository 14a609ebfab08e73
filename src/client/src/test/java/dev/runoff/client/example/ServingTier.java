package dev.runoff.client.example;

import dev.runoff.records.avro.EventType;
import dev.runoff.client.AllocationTable;
import dev.runoff.client.ArmAssignment;
import dev.runoff.client.ControlTopicFollower;
import dev.runoff.client.OutcomeReporter;
import dev.runoff.client.PickPolicy;
import dev.runoff.client.StaleFallback;
import dev.runoff.client.UnitPseudonymizer;
import java.time.Clock;
import java.time.Duration;
import java.util.Map;
import org.apache.kafka.clients.producer.KafkaProducer;
import org.apache.kafka.clients.producer.ProducerConfig;
import org.apache.kafka.common.serialization.ByteArraySerializer;
import org.apache.kafka.common.serialization.StringSerializer;

/** A serving tier that follows the weights of one experiment and reports what it served (README example). */
public final class ServingTier implements AutoCloseable {
    private static final String EXPERIMENT = "checkout-button";

    private final AllocationTable table;
    private final ControlTopicFollower follower;
    private final KafkaProducer<String, byte[]> producer;
    private final OutcomeReporter outcomes;

    /**
     * Starts following the control topic; returns once every control record published so far is in memory.
     *
     * @param bootstrapServers the Kafka cluster the job writes to
     * @param unitHashKey      secret key (at least 32 bytes) shared by every process that reports events
     * @param clock            the clock of staleness checks and event timestamps
     */
    public ServingTier(String bootstrapServers, byte[] unitHashKey, Clock clock) {
        PickPolicy policy = PickPolicy.builder("control")   // unknown experiment: serve "control"
                .staleFallback(StaleFallback.DEFAULT_ARM)       // job silent past validUntil: "control" too
                .build();                                       // hashed: sticky per user
        table = AllocationTable.create(policy, clock);
        follower = ControlTopicFollower.builder(table, bootstrapServers)   // topic runoff.allocations
                .startupTimeout(Duration.ofSeconds(30))
                .start();
        producer = new KafkaProducer<>(Map.of(ProducerConfig.BOOTSTRAP_SERVERS_CONFIG, bootstrapServers,
                ProducerConfig.ACKS_CONFIG, "all"), new StringSerializer(), new ByteArraySerializer());
        outcomes = OutcomeReporter.builder(producer, UnitPseudonymizer.withKey(unitHashKey))   // runoff.outcomes
                .clock(clock)
                .build();
    }

    /** On every page view: the arm to render for this user (its colour is arm()), with its exposure reported. */
    public ArmAssignment buttonColour(String userId, String requestId) {
        ArmAssignment served = table.assign(EXPERIMENT, userId);   // sticky per user, never throws
        outcomes.exposure(served, requestId);   // sent only if the arm was drawn for the experiment
        return served;                          // keep it (in the session, say) for the user's outcomes
    }

    /** When the user clicks the button: the click carries the arm the user was served. */
    public void clicked(ArmAssignment served, String clickId) {
        outcomes.outcome(served, clickId, EventType.CLICK, null);
    }

    /** Stops following and flushes the reported events. */
    @Override
    public void close() {
        follower.close();
        producer.close();
    }
}
