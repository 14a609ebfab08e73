package dev.runoff.audit;

import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;
import dev.runoff.records.Decoded;
import dev.runoff.records.Format;
import dev.runoff.records.Problem;
import dev.runoff.records.Reason;
import dev.runoff.records.RecordCodec;
import dev.runoff.records.avro.DecisionRecord;
import java.io.IOException;
import java.util.List;

/**
 * Turns the bytes of one decision record (Avro single-object encoding or JSON) into an {@link Entry} with the
 * records package's codec, which checks every field and that the hash matches the content. When the codec
 * rejects the record, the identity fields are read without checks so the record can still be named.
 */
public final class EntryDecoder {

    private static final ObjectMapper JSON = new ObjectMapper();

    private final RecordCodec<DecisionRecord> codec = RecordCodec.decisionRecords();
    private final long nowMillis;

    /**
     * A decoder checking time rules at {@code nowMillis} (decision records have none today).
     *
     * @throws IllegalArgumentException when {@code nowMillis} is negative
     */
    public EntryDecoder(long nowMillis) {
        if (nowMillis < 0) {
            throw new IllegalArgumentException("nowMillis must be >= 0, got " + nowMillis);
        }
        this.nowMillis = nowMillis;
    }

    /**
     * Decodes one record.
     *
     * @param bytes    the record value (null for a tombstone)
     * @param key      the record key (the experiment id), or {@code null} when there is none (files)
     * @param position where it was read
     */
    public Entry decode(byte[] bytes, String key, Position position) {
        Decoded<DecisionRecord> decoded = codec.decode(bytes, nowMillis);
        if (decoded.isValid()) {
            DecisionRecord record = decoded.orThrow();
            if (key == null || key.equals(record.getExperimentId())) {
                return Entry.valid(position, key, record);
            }
            return rejected(bytes, key, position, List.of(new Problem("experimentId", Reason.INCONSISTENT,
                    "'" + record.getExperimentId() + "' differs from the record key '" + key + "'")));
        }
        return rejected(bytes, key, position, decoded.problems());
    }

    private static Entry rejected(byte[] bytes, String key, Position position, List<Problem> problems) {
        Identity id = bytes == null || bytes.length == 0 ? Identity.NONE
                : Format.detect(bytes) == Format.AVRO ? fromAvro(bytes) : fromJson(bytes);
        return new Entry(position, key != null ? key : id.experimentId, id.sequence, id.hash, id.previousHash, null,
                problems);
    }

    /** Reads the identity from Avro without any check; {@link Identity#NONE} when the bytes do not decode. */
    private static Identity fromAvro(byte[] bytes) {
        try {
            DecisionRecord raw = DecisionRecord.getDecoder().decode(bytes);
            return new Identity(raw.getExperimentId(), raw.getSequence(), raw.getHash(), raw.getPreviousHash());
        } catch (IOException | RuntimeException e) {
            return Identity.NONE;
        }
    }

    /** Reads the identity from a JSON object without any check; missing or mistyped fields stay null. */
    private static Identity fromJson(byte[] bytes) {
        try {
            JsonNode node = JSON.readTree(bytes);
            if (node == null || !node.isObject()) {
                return Identity.NONE;
            }
            JsonNode sequence = node.get("sequence");
            return new Identity(text(node, "experimentId"),
                    sequence != null && sequence.canConvertToExactIntegral() ? sequence.asLong() : null,
                    text(node, "hash"), text(node, "previousHash"));
        } catch (IOException e) {
            return Identity.NONE;
        }
    }

    private static String text(JsonNode node, String field) {
        JsonNode value = node.get(field);
        return value != null && value.isTextual() ? value.asText() : null;
    }

    private record Identity(String experimentId, Long sequence, String hash, String previousHash) {
        static final Identity NONE = new Identity(null, null, null, null);
    }
}
