package dev.runoff.records;

import dev.runoff.records.avro.DecisionRecord;
import java.nio.charset.StandardCharsets;
import java.util.ArrayList;
import java.util.HexFormat;
import java.util.List;
import java.util.OptionalInt;

/**
 * The per-experiment hash chain of decision records. The hash of a record is the SHA-256 (FIPS 180-4) of
 * the UTF-8 bytes of its {@link CanonicalJson canonical JSON} with the {@code hash}, {@code keyId} and
 * {@code signature} fields left out (so signing a sealed record leaves its hash as it is; the signature
 * covers the hash and the key id, see {@link RecordSignatures}), as 64
 * lowercase hex digits. {@code previousHash} of record n is the hash of record n - 1; that of the first
 * record is {@link #GENESIS}. Changing any field of any record, or removing, inserting or reordering
 * records, breaks the chain from that record on.
 */
public final class HashChain {

    /** previousHash of the first record of an experiment: 64 zeros. */
    public static final String GENESIS = "0".repeat(64);

    /** Name of the field excluded from its own hash. */
    public static final String HASH_FIELD = "hash";

    /** Fields left out of the hash: the hash itself and the signature's two fields. */
    private static final java.util.Set<String> UNHASHED = java.util.Set.of(HASH_FIELD, RecordSignatures.KEY_ID_FIELD,
            RecordSignatures.SIGNATURE_FIELD);

    /** Hex digits of a SHA-256 hash. */
    private static final int HASH_DIGITS = 64;

    /**
     * The content and hash of the record this thread sealed last. A sealed record is usually checked again
     * before it is written ({@link RecordCodec#encode} checks its hash); when its content still matches, the
     * hash computed at sealing is the answer, and the canonical JSON is not written twice.
     */
    private static final ThreadLocal<SealedContent> LAST_SEALED = new ThreadLocal<>();

    private HashChain() {
    }

    /** SHA-256 of {@code data} as 64 lowercase hex digits. */
    public static String sha256Hex(byte[] data) {
        return HexFormat.of().formatHex(Sha256.digest(data));
    }

    /**
     * The hash {@code record} should carry: SHA-256 of its canonical JSON without the hash, keyId and
     * signature fields (whatever they hold now).
     *
     * @throws IllegalArgumentException when the record holds a value canonical JSON cannot represent
     */
    public static String hashOf(DecisionRecord record) {
        SealedContent last = LAST_SEALED.get();
        if (last != null && last.matches(record)) {
            return last.hash();
        }
        return computeHash(record);
    }

    private static String computeHash(DecisionRecord record) {
        return sha256Hex(CanonicalJson.without(record, UNHASHED).getBytes(StandardCharsets.UTF_8));
    }

    /**
     * A copy of {@code record} linked to {@code previousHash} and carrying its own hash, unsigned (any
     * signature of the input is dropped: it no longer matches).
     *
     * @throws IllegalArgumentException when {@code previousHash} is not 64 lowercase hex digits
     */
    public static DecisionRecord seal(DecisionRecord record, String previousHash) {
        return seal(DecisionRecord.newBuilder(record), previousHash);
    }

    /**
     * The record {@code builder} builds, linked to {@code previousHash} and carrying its own hash, unsigned: as
     * {@link #seal(DecisionRecord, String)} without first copying a record. The sealed record holds the very
     * values given to the builder (a nested record or list set on it is shared, not copied), so a caller that
     * keeps them must not change them afterwards.
     *
     * @throws IllegalArgumentException when {@code previousHash} is not 64 lowercase hex digits
     */
    public static DecisionRecord seal(DecisionRecord.Builder builder, String previousHash) {
        if (previousHash == null || !isHash(previousHash)) {
            throw new IllegalArgumentException("previousHash must be 64 lowercase hex digits, got " + previousHash);
        }
        DecisionRecord sealed = builder.setPreviousHash(previousHash).setHash("").setKeyId(null).setSignature(null)
                .build();
        String hash = computeHash(sealed);
        sealed.setHash(hash);
        LAST_SEALED.set(SealedContent.of(sealed, hash));
        return sealed;
    }

    /** Sealed copies of {@code records}, in order, the first linked to {@link #GENESIS}. */
    public static List<DecisionRecord> chain(List<DecisionRecord> records) {
        List<DecisionRecord> sealed = new ArrayList<>(records.size());
        String previous = GENESIS;
        for (DecisionRecord record : records) {
            DecisionRecord next = seal(record, previous);
            sealed.add(next);
            previous = next.getHash();
        }
        return sealed;
    }

    /**
     * Index of the first record whose hash does not match its content or whose previousHash is not the hash
     * of the record before it ({@link #GENESIS} for the first), or empty when the whole chain holds.
     */
    public static OptionalInt firstBreak(List<DecisionRecord> records) {
        return firstBreak(records, GENESIS);
    }

    /** As {@link #firstBreak(List)} for a slice of a chain whose first record follows {@code previousHash}. */
    public static OptionalInt firstBreak(List<DecisionRecord> records, String previousHash) {
        String previous = previousHash;
        for (int i = 0; i < records.size(); i++) {
            DecisionRecord record = records.get(i);
            if (!previous.equals(record.getPreviousHash()) || !hashOf(record).equals(record.getHash())) {
                return OptionalInt.of(i);
            }
            previous = record.getHash();
        }
        return OptionalInt.empty();
    }

    /** True for 64 lowercase hex digits. */
    static boolean isHash(String text) {
        if (text.length() != HASH_DIGITS) {
            return false;
        }
        for (int i = 0; i < HASH_DIGITS; i++) {
            char c = text.charAt(i);
            if (!(c >= '0' && c <= '9' || c >= 'a' && c <= 'f')) {
                return false;
            }
        }
        return true;
    }
}
