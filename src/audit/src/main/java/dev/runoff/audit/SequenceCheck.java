package dev.runoff.audit;

import java.util.ArrayList;
import java.util.HashSet;
import java.util.List;
import java.util.Set;

/**
 * Sequence numbers of one experiment's records, in the order read: 1 for the first, then one more per record.
 * After a mismatch the count resumes from the record read, so one missing record yields one finding.
 */
public final class SequenceCheck {

    private SequenceCheck() {
    }

    /** Findings for every record whose sequence is not the one expected; unreadable sequences are skipped. */
    public static List<Finding> check(List<Entry> entries) {
        List<Finding> findings = new ArrayList<>();
        Set<Long> seen = new HashSet<>();
        Long expected = 1L;
        for (int i = 0; i < entries.size(); i++) {
            Entry entry = entries.get(i);
            Long sequence = entry.sequence();
            if (sequence == null) {
                expected = null;
                continue;
            }
            if (expected != null && !sequence.equals(expected)) {
                findings.add(Finding.of(i, entry, Check.SEQUENCE, "sequence", describe(sequence, expected, seen)));
            }
            seen.add(sequence);
            expected = sequence + 1;
        }
        return findings;
    }

    private static String describe(long sequence, long expected, Set<Long> seen) {
        String head = "is " + sequence + " where " + expected + " was expected: ";
        if (seen.contains(sequence)) {
            return head + "sequence " + sequence + " was already read (a repeat)";
        }
        if (sequence < expected) {
            return head + "it comes after a higher sequence (records out of order)";
        }
        String missing = (sequence - expected == 1 ? "record " + expected + " is"
                : "records " + expected + " to " + (sequence - 1) + " are") + " missing";
        return head + missing + (seen.isEmpty() ? " from the start" : " here (deleted, or moved later)");
    }
}
