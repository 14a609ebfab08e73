package dev.runoff.audit;

import dev.runoff.records.Problem;
import dev.runoff.records.avro.DecisionRecord;
import java.util.List;
import java.util.Objects;

/**
 * One decision record as read, valid or not. A record the codec rejected keeps what could still be read of
 * its identity (experiment id, sequence, hashes; each {@code null} when unreadable), so that the checks can
 * name it and follow the chain past it.
 *
 * @param position     where it was read
 * @param experimentId the record key, else the experiment id read from the value; {@code null} if neither
 * @param sequence     its sequence number, or {@code null} when unreadable
 * @param hash         its hash field, or {@code null} when unreadable
 * @param previousHash its previousHash field, or {@code null} when unreadable
 * @param record       the record when the codec accepted it, else {@code null}
 * @param problems     the codec's problems; empty exactly when {@code record} is present
 */
public record Entry(Position position, String experimentId, Long sequence, String hash, String previousHash,
                    DecisionRecord record, List<Problem> problems) {

    /** Checks that a record and problems do not both appear, nor both lack. */
    public Entry {
        Objects.requireNonNull(position, "position");
        problems = List.copyOf(problems);
        if ((record == null) == problems.isEmpty()) {
            throw new IllegalArgumentException("an entry holds either a valid record or problems, at "
                    + position);
        }
    }

    /** An entry for a record the codec accepted. */
    public static Entry valid(Position position, String key, DecisionRecord record) {
        String experimentId = key != null ? key : record.getExperimentId();
        return new Entry(position, experimentId, record.getSequence(), record.getHash(), record.getPreviousHash(),
                record, List.of());
    }

    /** Whether the codec accepted the record. */
    public boolean isValid() {
        return record != null;
    }

    /** {@code sequence 7 (line 7)}, or {@code line 7} when the sequence is unreadable. */
    public String describe() {
        return sequence == null ? position.toString() : "sequence " + sequence + " (" + position + ")";
    }
}
