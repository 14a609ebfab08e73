package dev.runoff.records;

import dev.runoff.engine.core.Checks;
import dev.runoff.records.avro.AllocationUpdate;
import dev.runoff.records.avro.DecisionRecord;
import dev.runoff.records.avro.ExperimentDefinition;
import dev.runoff.records.avro.OutcomeEvent;
import java.nio.charset.StandardCharsets;
import java.util.ArrayList;
import java.util.List;
import org.apache.avro.Schema;
import org.apache.avro.specific.SpecificData;
import org.apache.avro.specific.SpecificRecord;

/**
 * Reads and writes one record type of the topics. Immutable and thread-safe.
 *
 * <p>Reading ({@link #decode}) accepts Avro single-object encoding (bytes starting {@code 0xC3 0x01}) and
 * JSON (anything else), then checks the record: first the rules every field obeys (present, strings of at
 * most 256 code points without control characters or unpaired surrogates, finite doubles, at most 100
 * items per list), then the rules of the record type. The result is either a complete, valid record or
 * every problem found, each naming its field.
 *
 * <p>JSON layout: one object with the schema's camelCase field names, e.g.
 * {@code {"experimentId":"e1","unitId":"9f2c","eventId":"ev-1","type":"CLICK","timestamp":1700000000000}}.
 * Enums are their symbol strings; integer fields are JSON integers (no fraction or exponent); fields with a
 * default and nullable fields may be omitted; a prior or posterior is the object of its parameters
 * ({@code {"a":1,"b":1}} or {@code {"mu0":0,"kappa0":1,"alpha0":1,"beta0":1}}). Duplicate keys are
 * rejected; unknown keys are rejected for definitions (likely typos) and ignored for the other records
 * (producers with a newer schema).
 *
 * <p>Writing ({@link #encode}) checks the record the same way (without the time rules) and refuses to
 * write an invalid one; it writes Avro single-object encoding by default, or {@link CanonicalJson}.
 *
 * @param <T> generated record class
 */
public final class RecordCodec<T extends SpecificRecord> {

    private static final int EVENT_MAX_BYTES = 16 * 1024;

    private final Class<T> type;
    private final Schema schema;
    private final Limits limits;
    private final boolean strictJson;
    private final RecordRules<T> rules;
    private final List<Schema> olderWriterSchemas;
    private final AvroSingleObject<T> avro;
    private final JsonRecordReader json;
    private final SchemaChecks checks;

    private RecordCodec(Class<T> type, Limits limits, boolean strictJson, RecordRules<T> rules,
                        List<Schema> olderWriterSchemas) {
        this.type = type;
        this.schema = SpecificData.get().getSchema(type);
        this.limits = limits;
        this.strictJson = strictJson;
        this.rules = rules;
        this.olderWriterSchemas = List.copyOf(olderWriterSchemas);
        this.avro = new AvroSingleObject<>(schema, this.olderWriterSchemas);
        this.json = new JsonRecordReader(limits);
        this.checks = new SchemaChecks(limits);
    }

    /**
     * Codec of outcome events, with the default limits and inputs of at most 16 KiB; also reads Avro written
     * with every earlier version of the schema ({@link WriterSchemas}).
     */
    public static RecordCodec<OutcomeEvent> outcomeEvents() {
        return new RecordCodec<>(OutcomeEvent.class, Limits.DEFAULT.withMaxBytes(EVENT_MAX_BYTES), false,
                new OutcomeEventRules(), WriterSchemas.previous("OutcomeEvent"));
    }

    /**
     * Codec of experiment definitions, with the default limits; unknown JSON fields are rejected; also reads
     * Avro written with every earlier version of the schema ({@link WriterSchemas}).
     */
    public static RecordCodec<ExperimentDefinition> definitions() {
        return new RecordCodec<>(ExperimentDefinition.class, Limits.DEFAULT, true, new DefinitionRules(),
                WriterSchemas.previous("ExperimentDefinition"));
    }

    /**
     * Codec of allocation updates (control records), with the default limits; also reads Avro written with
     * every earlier version of the schema ({@link WriterSchemas}).
     */
    public static RecordCodec<AllocationUpdate> allocationUpdates() {
        return new RecordCodec<>(AllocationUpdate.class, Limits.DEFAULT, false, new AllocationUpdateRules(),
                WriterSchemas.previous("AllocationUpdate"));
    }

    /**
     * Codec of decision (audit) records, with the default limits; also reads Avro written with every earlier
     * version of the schema ({@link WriterSchemas}).
     */
    public static RecordCodec<DecisionRecord> decisionRecords() {
        return new RecordCodec<>(DecisionRecord.class, Limits.DEFAULT, false, new DecisionRecordRules(),
                WriterSchemas.previous("DecisionRecord"));
    }

    /** This codec with other limits. */
    public RecordCodec<T> withLimits(Limits newLimits) {
        return new RecordCodec<>(type, newLimits, strictJson, rules, olderWriterSchemas);
    }

    /**
     * This codec also reading Avro written with {@code writerSchema} (an older version of the record's
     * schema), resolved to the current schema by Avro's schema resolution.
     */
    public RecordCodec<T> withWriterSchema(Schema writerSchema) {
        List<Schema> schemas = new ArrayList<>(olderWriterSchemas);
        schemas.add(writerSchema);
        return new RecordCodec<>(type, limits, strictJson, rules, schemas);
    }

    /** The current (reader and writer) schema. */
    public Schema schema() {
        return schema;
    }

    /** The limits in force. */
    public Limits limits() {
        return limits;
    }

    /**
     * Decodes and checks {@code bytes}; {@code nowMillis} is the reader's current time (stream or wall
     * clock, the caller's choice) for the time rules.
     *
     * @throws IllegalArgumentException when {@code nowMillis} is negative
     */
    public Decoded<T> decode(byte[] bytes, long nowMillis) {
        Checks.nonNegative("nowMillis", nowMillis);
        Problems problems = new Problems();
        if (bytes == null || bytes.length == 0) {
            problems.add(Problem.WHOLE_RECORD, Reason.EMPTY, bytes == null
                    ? "no value (a null value is a tombstone, not a record)" : "empty input");
            return Decoded.rejected(problems.list());
        }
        if (bytes.length > limits.maxBytes()) {
            problems.add(Problem.WHOLE_RECORD, Reason.TOO_LARGE,
                    bytes.length + " bytes, at most " + limits.maxBytes() + " allowed");
            return Decoded.rejected(problems.list());
        }
        Object record = Format.detect(bytes) == Format.AVRO
                ? avro.decode(bytes, problems) : json.read(bytes, schema, strictJson, problems);
        return record == null ? Decoded.rejected(problems.list()) : validate(type.cast(record), nowMillis);
    }

    /**
     * Checks a record built in memory with every rule, including the time rules at {@code nowMillis}:
     * returns it when valid, else the full list of problems.
     *
     * @throws IllegalArgumentException when {@code nowMillis} is negative
     */
    public Decoded<T> validate(T record, long nowMillis) {
        Checks.nonNegative("nowMillis", nowMillis);
        Problems problems = check(record);
        if (problems.isEmpty()) {
            rules.checkAt(record, nowMillis, limits, problems);
        }
        return problems.isEmpty() ? Decoded.valid(record) : Decoded.rejected(problems.list());
    }

    /** {@link #encode(SpecificRecord, Format)} in Avro single-object encoding. */
    public byte[] encode(T record) {
        return encode(record, Format.AVRO);
    }

    /**
     * Writes {@code record} after checking it with every rule that does not depend on the current time.
     *
     * @throws RecordRejectedException when the record is invalid or its encoding exceeds the byte limit
     */
    public byte[] encode(T record, Format format) {
        Problems problems = check(record);
        if (!problems.isEmpty()) {
            throw new RecordRejectedException(problems.list());
        }
        byte[] bytes = format == Format.AVRO
                ? avro.encode(record) : CanonicalJson.of(record).getBytes(StandardCharsets.UTF_8);
        if (bytes.length > limits.maxBytes()) {
            problems.add(Problem.WHOLE_RECORD, Reason.TOO_LARGE, bytes.length + " bytes encoded, more than the "
                    + limits.maxBytes() + " readers accept");
            throw new RecordRejectedException(problems.list());
        }
        return bytes;
    }

    /** Generic field rules, then (only if they hold, so that no field is null) the record type's rules. */
    private Problems check(T record) {
        Problems problems = new Problems();
        checks.check(record, problems);
        if (problems.isEmpty()) {
            rules.check(record, limits, problems);
        }
        return problems;
    }
}
