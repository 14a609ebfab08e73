package dev.runoff.client;

import dev.runoff.records.Format;
import dev.runoff.records.RecordCodec;
import dev.runoff.records.RecordRejectedException;
import dev.runoff.records.avro.EventType;
import dev.runoff.records.avro.OutcomeEvent;
import java.time.Clock;
import java.util.Objects;
import java.util.Optional;
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
 * <p>Every event carries the arm the unit was served: exposures, and clicks, conversions and values too, so
 * that the job can credit an outcome to the unit's counted exposure and reject, with a named reason, one
 * whose arm disagrees. The easy path is {@link AllocationTable#assign}, whose {@link ArmAssignment} this
 * reporter takes: it reports an exposure only when the arm was drawn for the experiment (a default arm served
 * for an unknown experiment is part of no experiment) and sends outcomes with the assignment's arm. Report an
 * exposure when the arm is actually served, once per serving (not once per pick you discard). Give each event
 * an id that stays the same when you retry sending it (a request id, say), so that the job's deduplication
 * drops the retries.
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
     * Sends the exposure of an assignment that {@link AllocationTable#assign} made, if it is one: an arm that
     * was not drawn for the experiment ({@link ArmAssignment#drawn()} false: unknown experiment, missing unit
     * key, default-arm fallback) is no exposure, and nothing is sent.
     *
     * @param served  the assignment served
     * @param eventId an id unique to this exposure, stable across retries
     * @return the producer's future of the send, or empty when nothing was sent
     * @throws RecordRejectedException  when the event breaks the schema's rules (blank or over-long ids...)
     * @throws IllegalArgumentException when the assignment has no unit key (a random pick made without one)
     */
    public Optional<Future<RecordMetadata>> exposure(ArmAssignment served, String eventId) {
        Objects.requireNonNull(served, "served");
        return served.drawn()
                ? Optional.of(exposure(served.experimentId(), served.unitKey(), served.arm(), eventId))
                : Optional.empty();
    }

    /**
     * Sends a CLICK, CONVERSION or VALUE event of the unit of {@code served}, carrying the arm it was served:
     * the job credits it to the unit's counted exposure and rejects it when that exposure's arm differs. Keep
     * the assignment of the exposure that led to the outcome (in the session, say, or rebuild it with
     * {@link ArmAssignment#of}); nothing is sent for an assignment that was not drawn.
     *
     * @param eventId an id unique to this outcome, stable across retries
     * @param type    CLICK, CONVERSION or VALUE
     * @param value   the outcome's value: required for VALUE, optional for CONVERSION, null for CLICK
     * @return the producer's future of the send, or empty when nothing was sent
     * @throws RecordRejectedException  when the event breaks the schema's rules
     * @throws IllegalArgumentException when {@code type} is EXPOSURE or the assignment has no unit key
     */
    public Optional<Future<RecordMetadata>> outcome(ArmAssignment served, String eventId, EventType type,
                                                    Double value) {
        Objects.requireNonNull(served, "served");
        return served.drawn()
                ? Optional.of(outcome(served.experimentId(), served.unitKey(), served.arm(), eventId, type, value))
                : Optional.empty();
    }

    /**
     * Sends a guardrail signal of the unit {@code served} was drawn for (a CONVERSION event carrying
     * {@code signal} and the served arm), or nothing when it was not drawn: the event counts only for the
     * experiment's guardrails that count {@code signal}.
     *
     * @param eventId an id unique to this event, stable across retries
     * @param signal  the guardrail signal, e.g. {@code payment-failed}
     * @return the producer's future of the send, or empty when nothing was sent
     * @throws RecordRejectedException when the event breaks the schema's rules (a malformed signal...)
     */
    public Optional<Future<RecordMetadata>> signal(ArmAssignment served, String eventId, String signal) {
        Objects.requireNonNull(served, "served");
        return served.drawn() ? Optional.of(send(event(served.experimentId(), served.unitKey(), eventId,
                EventType.CONVERSION, Args.notBlank("arm", served.arm()), null, Objects.requireNonNull(signal,
                        "signal")))) : Optional.empty();
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
     * Sends a CLICK, CONVERSION or VALUE event of {@code unitId} with the arm the unit was served (see
     * {@link #outcome(ArmAssignment, String, EventType, Double)}).
     *
     * @param arm   the arm the unit was served when it was exposed; required
     * @param value the outcome's value: required for VALUE, optional for CONVERSION, null for CLICK
     * @throws RecordRejectedException  when the event breaks the schema's rules
     * @throws IllegalArgumentException when {@code unitId} is null or empty, {@code arm} is null or blank, or
     *                                  {@code type} is EXPOSURE
     */
    public Future<RecordMetadata> outcome(String experimentId, String unitId, String arm, String eventId,
                                          EventType type, Double value) {
        return send(outcomeEvent(experimentId, unitId, arm, eventId, type, value));
    }

    /**
     * The exposure event {@link #exposure} would send, built and checked but not sent (for other transports
     * and for tests).
     *
     * @throws RecordRejectedException  when the event breaks the schema's rules
     * @throws IllegalArgumentException when {@code unitId} is null or empty
     */
    public OutcomeEvent exposureEvent(String experimentId, String unitId, String arm, String eventId) {
        return event(experimentId, unitId, eventId, EventType.EXPOSURE, arm, null, null);
    }

    /**
     * The outcome event {@link #outcome(String, String, String, String, EventType, Double)} would send, built
     * and checked but not sent.
     *
     * @throws RecordRejectedException  when the event breaks the schema's rules
     * @throws IllegalArgumentException when {@code unitId} is null or empty, {@code arm} is null or blank, or
     *                                  {@code type} is EXPOSURE
     */
    public OutcomeEvent outcomeEvent(String experimentId, String unitId, String arm, String eventId,
                                     EventType type, Double value) {
        if (type == EventType.EXPOSURE) {
            throw new IllegalArgumentException("type must be CLICK, CONVERSION or VALUE (use exposure(...)), got "
                    + type);
        }
        return event(experimentId, unitId, eventId, type, Args.notBlank("arm", arm), value, null);
    }

    private OutcomeEvent event(String experimentId, String unitId, String eventId, EventType type, String arm,
                               Double value, String signal) {
        long now = clock.millis();
        OutcomeEvent event = OutcomeEvent.newBuilder()
                .setExperimentId(experimentId)
                .setUnitId(pseudonymizer.pseudonym(unitId))
                .setEventId(eventId)
                .setType(Objects.requireNonNull(type, "type"))
                .setTimestamp(now)
                .setArm(arm)
                .setValue(value)
                .setSignal(signal)
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
