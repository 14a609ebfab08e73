package dev.runoff.records;

import java.util.Base64;
import java.util.Collection;
import java.util.LinkedHashMap;
import java.util.Map;
import java.util.Set;
import org.apache.avro.generic.IndexedRecord;

/**
 * Checks record signatures against a set of public keys, found by key id; several keys allow rotation (old
 * records stay verifiable while new ones use the new key). A key left out of the set is retired: records it
 * signed fail as signed by an unknown key. Immutable and thread-safe.
 */
public final class SignatureVerifier {

    private final Map<String, VerificationKey> keys;

    private SignatureVerifier(Map<String, VerificationKey> keys) {
        this.keys = keys;
    }

    /**
     * A verifier trusting {@code keys}.
     *
     * @throws IllegalArgumentException when the set is empty or two keys share an id
     */
    public static SignatureVerifier of(Collection<VerificationKey> keys) {
        if (keys.isEmpty()) {
            throw new IllegalArgumentException("a signature verifier needs at least one public key");
        }
        Map<String, VerificationKey> byId = new LinkedHashMap<>();
        for (VerificationKey key : keys) {
            if (byId.putIfAbsent(key.keyId(), key) != null) {
                throw new IllegalArgumentException("two public keys share the key id '" + key.keyId() + "'");
            }
        }
        return new SignatureVerifier(Map.copyOf(byId));
    }

    /** The ids of the trusted keys. */
    public Set<String> keyIds() {
        return keys.keySet();
    }

    /** The outcome for {@code record}, which must have {@code keyId} and {@code signature} fields. */
    public Outcome check(IndexedRecord record) {
        Object keyId = get(record, RecordSignatures.KEY_ID_FIELD);
        Object signature = get(record, RecordSignatures.SIGNATURE_FIELD);
        if (keyId == null || signature == null) {
            return new Outcome(Status.UNSIGNED, keyId == null ? null : keyId.toString(), "the record is not signed");
        }
        String id = keyId.toString();
        VerificationKey key = keys.get(id);
        if (key == null) {
            return new Outcome(Status.UNKNOWN_KEY, id, "signed by key '" + id + "', which is not among the trusted "
                    + "keys " + new java.util.TreeSet<>(keys.keySet()) + " (unknown or retired)");
        }
        byte[] bytes;
        try {
            bytes = Base64.getDecoder().decode(signature.toString());
        } catch (IllegalArgumentException e) {
            return new Outcome(Status.BAD_SIGNATURE, id, "the signature is not base64");
        }
        return key.verifies(RecordSignatures.payload(record), bytes) ? new Outcome(Status.VALID, id, "valid")
                : new Outcome(Status.BAD_SIGNATURE, id, "the signature by key '" + id
                + "' does not match the record's content");
    }

    private static Object get(IndexedRecord record, String field) {
        org.apache.avro.Schema.Field f = record.getSchema().getField(field);
        if (f == null) {
            throw new IllegalArgumentException(record.getSchema().getName() + " has no field " + field);
        }
        return record.get(f.pos());
    }

    /** How a signature check ended. */
    public enum Status {
        /** Signed by a trusted key, and the signature matches. */
        VALID,
        /** No key id or no signature. */
        UNSIGNED,
        /** Signed by a key that is not trusted. */
        UNKNOWN_KEY,
        /** Signed by a trusted key, but the signature does not match (the record was changed, or forged). */
        BAD_SIGNATURE
    }

    /**
     * One check's outcome.
     *
     * @param status  how it ended
     * @param keyId   the record's key id, null when it has none
     * @param message a readable explanation naming the key id
     */
    public record Outcome(Status status, String keyId, String message) {

        /** True for {@link Status#VALID}. */
        public boolean valid() {
            return status == Status.VALID;
        }
    }
}
