package dev.runoff.client;

import dev.runoff.records.Format;
import dev.runoff.records.RecordCodec;
import dev.runoff.records.RecordRejectedException;
import dev.runoff.records.avro.EventType;
import dev.runoff.records.avro.OutcomeEvent;
import java.time.Clock;
import java.util.Objects;
import java.util.concurrent.Future;
import org.apache.kafka.clients.producer.Producer;
import org.apache.kafka.clients.producer.ProducerRecord;
import org.apache.kafka.clients.producer.RecordMetadata;

/**
 * Writes outcome events (exposures first of all) to the outcome topic in the schema the job reads, so that
 * the feed is right by construction: the record is built from typed arguments, checked with
 * {@code RecordCodec.outcomeEvents()} (the codec the job validates with) and encoded by it.
 *
 * <p>The unit id is replaced by its {@link UnitPseudonymizer} pseudonym before anything is built: the raw
 * id never reaches the record, its key or the broker. The record key is the pseudonym, the record and event
 * timestamps are the injected clock's time.
 *
 * <p>Report an exposure when the arm is actually served, once per serving (not once per pick you discard),
 * and only for experiments the table holds ({@link AllocationTable#contains}): a default arm served for an
 * unknown experiment is not part of any experiment. Give each event an id that stays the same when you
 * retry sending it (a request id, say), so that the job's deduplication drops the retries.
 *
 * <p>Thread-safe if the producer is (a {@code KafkaProducer} is). It does not own the producer.
 */
public final class OutcomeReporter {
    /** Default name of the outcome topic. */
    public static final String DEFAULT_TOPIC = "runoff.outcomes";

    private final Producer<String, byte[]> producer;
    private final UnitPseudonymizer pseudonymizer;
    private final String topic;
    private final Clock clock;
    private final Format format;
    private final RecordCodec<OutcomeEvent> codec = RecordCodec.outcomeEvents();

    private OutcomeReporter(Builder builder) {
        this.producer = builder.producer;
        this.pseudonymizer = builder.pseudonymizer;
        this.topic = builder.topic;
        this.clock = builder.clock;
        this.format = builder.format;
    }

    /**
     * Starts describing a reporter.
     *
     * @param producer      producer with string keys and byte-array values
     * @param pseudonymizer the keyed hash applied to unit ids
     */
    public static Builder builder(Producer<String, byte[]> producer, UnitPseudonymizer pseudonymizer) {
        return new Builder(Objects.requireNonNull(producer, "producer"),
                Objects.requireNonNull(pseudonymizer, "pseudonymizer"));
    }

    /**
     * Sends the exposure of {@code unitId} to {@code arm}.
     *
     * @param experimentId the experiment
     * @param unitId       the raw unit id (the same key you picked with); it is pseudonymised here
     * @param arm          the arm served
     * @param eventId      an id unique to this exposure, stable across retries
     * @return the producer's future of the send
     * @throws RecordRejectedException  when the event breaks the schema's rules (blank or over-long ids...)
     * @throws IllegalArgumentException when {@code unitId} is null or empty
     */
    public Future<RecordMetadata> exposure(String experimentId, String unitId, String arm, String eventId) {
        return send(exposureEvent(experimentId, unitId, arm, eventId));
    }

    /**
     * Sends a CLICK, CONVERSION or VALUE event of {@code unitId}, without an arm: the job attributes it to
     * the unit's latest exposure in the experiment.
     *
     * @param value the outcome's value: required for VALUE, optional for CONVERSION, null for CLICK
     * @throws RecordRejectedException  when the event breaks the schema's rules
     * @throws IllegalArgumentException when {@code unitId} is null or empty, or {@code type} is EXPOSURE
     */
    public Future<RecordMetadata> outcome(String experimentId, String unitId, String eventId, EventType type,
                                          Double value) {
        if (type == EventType.EXPOSURE) {
            throw new IllegalArgumentException("type must be CLICK, CONVERSION or VALUE (use exposure(...)), got "
                    + type);
        }
        return send(event(experimentId, unitId, eventId, type, null, value));
    }

    /**
     * The exposure event {@link #exposure} would send, built and checked but not sent (for other transports
     * and for tests).
     *
     * @throws RecordRejectedException  when the event breaks the schema's rules
     * @throws IllegalArgumentException when {@code unitId} is null or empty
     */
    public OutcomeEvent exposureEvent(String experimentId, String unitId, String arm, String eventId) {
        return event(experimentId, unitId, eventId, EventType.EXPOSURE, arm, null);
    }

    private OutcomeEvent event(String experimentId, String unitId, String eventId, EventType type, String arm,
                               Double value) {
        long now = clock.millis();
        OutcomeEvent event = OutcomeEvent.newBuilder()
                .setExperimentId(experimentId)
                .setUnitId(pseudonymizer.pseudonym(unitId))
                .setEventId(eventId)
                .setType(Objects.requireNonNull(type, "type"))
                .setTimestamp(now)
                .setArm(arm)
                .setValue(value)
                .build();
        return codec.validate(event, now).orThrow();
    }

    private Future<RecordMetadata> send(OutcomeEvent event) {
        byte[] bytes = codec.encode(event, format);
        return producer.send(new ProducerRecord<>(topic, null, event.getTimestamp(), event.getUnitId(), bytes));
    }

    /** Describes an {@link OutcomeReporter}. */
    public static final class Builder {
        private final Producer<String, byte[]> producer;
        private final UnitPseudonymizer pseudonymizer;
        private String topic = DEFAULT_TOPIC;
        private Clock clock = Clock.systemUTC();
        private Format format = Format.AVRO;

        private Builder(Producer<String, byte[]> producer, UnitPseudonymizer pseudonymizer) {
            this.producer = producer;
            this.pseudonymizer = pseudonymizer;
        }

        /** Sets the outcome topic (default {@value OutcomeReporter#DEFAULT_TOPIC}). */
        public Builder topic(String name) {
            this.topic = Args.notBlank("topic", name);
            return this;
        }

        /** Sets the clock of event timestamps (default the system UTC clock). */
        public Builder clock(Clock eventClock) {
            this.clock = Objects.requireNonNull(eventClock, "clock");
            return this;
        }

        /** Sets the wire format (default Avro single-object encoding). */
        public Builder format(Format wireFormat) {
            this.format = Objects.requireNonNull(wireFormat, "format");
            return this;
        }

        /** Builds the reporter. */
        public OutcomeReporter build() {
            return new OutcomeReporter(this);
        }
    }
}
