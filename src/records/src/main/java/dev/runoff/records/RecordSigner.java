package dev.runoff.records;

import dev.runoff.records.avro.AllocationUpdate;
import dev.runoff.records.avro.DecisionRecord;
import java.util.Objects;

/**
 * How the job signs its output records: with one {@link SigningKey}, or not at all (only when the operator
 * said so, see {@code src/docs/audit.md}). Immutable and thread-safe.
 */
public final class RecordSigner {

    private static final RecordSigner UNSIGNED = new RecordSigner(null);

    private final SigningKey key;

    private RecordSigner(SigningKey key) {
        this.key = key;
    }

    /** A signer that leaves records unsigned. */
    public static RecordSigner unsigned() {
        return UNSIGNED;
    }

    /** A signer with {@code key}. */
    public static RecordSigner with(SigningKey key) {
        return new RecordSigner(Objects.requireNonNull(key, "key"));
    }

    /** True when records get signed. */
    public boolean signs() {
        return key != null;
    }

    /** The id of the signing key, or null when unsigned. */
    public String keyId() {
        return key == null ? null : key.keyId();
    }

    /** {@code record} signed, or as it is when unsigned. */
    public DecisionRecord sign(DecisionRecord record) {
        return key == null ? record : RecordSignatures.sign(record, key);
    }

    /** {@code record} signed, or as it is when unsigned. */
    public AllocationUpdate sign(AllocationUpdate record) {
        return key == null ? record : RecordSignatures.sign(record, key);
    }
}
