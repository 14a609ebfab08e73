package dev.runoff.topology;


import dev.runoff.engine.core.Metric;
import java.nio.charset.StandardCharsets;
import java.util.Objects;

/**
 * A valid outcome event on its way to deduplication and attribution, keyed by {@link #unitKey()}: the
 * fields the later steps need, what the definition says about it, and the original record for a later
 * rejection.
 *
 * @param experimentId        the experiment
 * @param unitId              the unit
 * @param eventId             the producer's event id
 * @param role                what the event is for the experiment's metric
 * @param metric              the metric kind of the experiment
 * @param arm                 the arm named by the event, or {@code null}
 * @param value               the event's value, or NaN when it has none
 * @param timestamp           the event's timestamp field (ms since the epoch)
 * @param attributionWindowMs the experiment's conversion (attribution) window
 * @param version             the definition version the event was checked against
 * @param unitLevel           whether the experiment counts units (Bernoulli with {@code UNIT}, value per unit)
 *                            rather than exposures
 * @param earlyGraceMs        how long an outcome that arrives before its unit's first trial event waits
 * @param source              where the record was read
 * @param originalKey         the original record key, or {@code null}
 * @param originalValue       the original record value
 * @param signal              GUARDRAIL: the signal the event carries; otherwise {@code null}
 * @param valueCap            value per unit: the metric's cap of a unit's sum; GUARDRAIL: the valueCap of the
 *                            value guardrails that count the signal; NaN otherwise
 */
record UnitEvent(String experimentId, String unitId, String eventId, Role role, Metric metric, String arm,
                 double value, long timestamp, long attributionWindowMs, long version, boolean unitLevel,
                 long earlyGraceMs, Source source, byte[] originalKey, byte[] originalValue, String signal,
                 double valueCap) {

    /** Serde of the repartition topic. */
    static final InternalSerde<UnitEvent> SERDE = new InternalSerde<>(UnitEvent::encode, UnitEvent::decode);

    private static final int FORMAT = 4;
    /** The format before values per unit (no cap field); still read, from a repartition topic an earlier job wrote. */
    private static final int FORMAT_WITHOUT_CAP = 3;
    /** The format before guardrail signals (no signal field); still read, from a repartition topic an earlier job wrote. */
    private static final int FORMAT_WITHOUT_SIGNAL = 2;

    /** Checks the fields every step relies on. */
    UnitEvent {
        Objects.requireNonNull(experimentId, "experimentId");
        Objects.requireNonNull(unitId, "unitId");
        Objects.requireNonNull(eventId, "eventId");
        Objects.requireNonNull(role, "role");
        Objects.requireNonNull(metric, "metric");
        Objects.requireNonNull(source, "source");
        Objects.requireNonNull(originalValue, "originalValue");
        if ((role == Role.GUARDRAIL) != (signal != null)) {
            throw new IllegalArgumentException("signal must be set for role GUARDRAIL only, got " + signal
                    + " for " + role);
        }
    }

    /** An event of a metric other than value per unit. */
    UnitEvent(String experimentId, String unitId, String eventId, Role role, Metric metric, String arm, double value,
              long timestamp, long attributionWindowMs, long version, boolean unitLevel, long earlyGraceMs,
              Source source, byte[] originalKey, byte[] originalValue, String signal) {
        this(experimentId, unitId, eventId, role, metric, arm, value, timestamp, attributionWindowMs, version,
                unitLevel, earlyGraceMs, source, originalKey, originalValue, signal, Double.NaN);
    }

    /** An event without a guardrail signal, of a metric other than value per unit. */
    UnitEvent(String experimentId, String unitId, String eventId, Role role, Metric metric, String arm, double value,
              long timestamp, long attributionWindowMs, long version, boolean unitLevel, long earlyGraceMs,
              Source source, byte[] originalKey, byte[] originalValue) {
        this(experimentId, unitId, eventId, role, metric, arm, value, timestamp, attributionWindowMs, version,
                unitLevel, earlyGraceMs, source, originalKey, originalValue, null);
    }

    /** What an event is for the metric of its experiment. */
    enum Role {
        /** The metric's trial event: it fixes the unit's arm and counts one trial (Bernoulli). */
        TRIAL,
        /** The Bernoulli metric's success event. */
        SUCCESS,
        /** The value metric's value event: one observation (value per unit: added to the unit's sum). */
        VALUE,
        /** An event with a guardrail signal: marks its unit for the guardrails that count the signal. */
        GUARDRAIL
    }

    /** {@code experimentId NUL unitId}: ids hold no control characters, so the key is unambiguous. */
    static String unitKey(String experimentId, String unitId) {
        return experimentId + '\u0000' + unitId;
    }

    /** {@link #unitKey(String, String)} of this event as UTF-8 bytes (the repartition key). */
    byte[] unitKeyBytes() {
        return unitKey(experimentId, unitId).getBytes(StandardCharsets.UTF_8);
    }

    /** {@code experimentId NUL eventId}, the deduplication key. */
    String eventKey() {
        return eventKey(experimentId, eventId);
    }

    /** The deduplication key of event {@code eventId} of {@code experimentId}. */
    static String eventKey(String experimentId, String eventId) {
        return experimentId + '\u0000' + eventId;
    }

    private static byte[] encode(UnitEvent e) {
        BinaryOut out = new BinaryOut().writeByte(FORMAT).writeString(e.experimentId).writeString(e.unitId)
                .writeString(e.eventId).writeByte(e.role.ordinal()).writeByte(e.metric.ordinal())
                .writeNullableString(e.arm).writeDouble(e.value).writeLong(e.timestamp)
                .writeLong(e.attributionWindowMs).writeLong(e.version).writeBoolean(e.unitLevel)
                .writeLong(e.earlyGraceMs);
        e.source.write(out);
        return out.writeNullableBytes(e.originalKey).writeBytes(e.originalValue).writeNullableString(e.signal)
                .writeDouble(e.valueCap).toByteArray();
    }

    private static UnitEvent decode(byte[] bytes) {
        BinaryIn in = new BinaryIn(bytes);
        int format = in.readByte();
        if (format != FORMAT && format != FORMAT_WITHOUT_CAP && format != FORMAT_WITHOUT_SIGNAL) {
            throw new IllegalArgumentException("unit event format " + format + " is not " + FORMAT);
        }
        UnitEvent event = new UnitEvent(in.readString(), in.readString(), in.readString(),
                Role.values()[in.readByte()], Metric.values()[in.readByte()], in.readNullableString(),
                in.readDouble(), in.readLong(), in.readLong(), in.readLong(), in.readBoolean(), in.readLong(),
                Source.read(in), in.readNullableBytes(), in.readBytes(),
                format == FORMAT_WITHOUT_SIGNAL ? null : in.readNullableString(),
                format == FORMAT ? in.readDouble() : Double.NaN);
        in.end();
        return event;
    }
}
