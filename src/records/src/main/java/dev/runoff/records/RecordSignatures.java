package dev.runoff.records;

import dev.runoff.records.avro.AllocationUpdate;
import dev.runoff.records.avro.DecisionRecord;
import java.nio.charset.StandardCharsets;
import java.util.Base64;
import java.util.Set;
import org.apache.avro.generic.IndexedRecord;

/**
 * What a record's signature covers: the UTF-8 bytes of its {@link CanonicalJson canonical JSON} without the
 * {@code signature} field, so with every other field, {@code keyId} and (for decision records) {@code hash}
 * and {@code previousHash} included. The signature is Ed25519 (RFC 8032) written as padded base64.
 */
public final class RecordSignatures {

    /** Name of the field holding the signing key's id. */
    public static final String KEY_ID_FIELD = "keyId";
    /** Name of the field holding the signature; the one field it does not cover. */
    public static final String SIGNATURE_FIELD = "signature";

    private RecordSignatures() {
    }

    /** The bytes the signature of {@code record} covers. */
    public static byte[] payload(IndexedRecord record) {
        return CanonicalJson.without(record, Set.of(SIGNATURE_FIELD)).getBytes(StandardCharsets.UTF_8);
    }

    /** A copy of {@code record} carrying {@code key}'s id and signature (any earlier signature replaced). */
    public static DecisionRecord sign(DecisionRecord record, SigningKey key) {
        DecisionRecord signed = DecisionRecord.newBuilder(record).setKeyId(key.keyId()).setSignature(null).build();
        signed.setSignature(encode(key.sign(payload(signed))));
        return signed;
    }

    /** A copy of {@code record} carrying {@code key}'s id and signature (any earlier signature replaced). */
    public static AllocationUpdate sign(AllocationUpdate record, SigningKey key) {
        AllocationUpdate signed = AllocationUpdate.newBuilder(record).setKeyId(key.keyId()).setSignature(null)
                .build();
        signed.setSignature(encode(key.sign(payload(signed))));
        return signed;
    }

    private static String encode(byte[] signature) {
        return Base64.getEncoder().encodeToString(signature);
    }
}
