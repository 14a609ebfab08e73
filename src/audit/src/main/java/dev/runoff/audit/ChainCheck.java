package dev.runoff.audit;

import dev.runoff.records.HashChain;
import java.util.ArrayList;
import java.util.List;

/**
 * The hash-chain links of one experiment's records, in the order read: each record's previousHash must equal
 * the hash field of the record read before it, and that of sequence 1 must be {@link HashChain#GENESIS}. That
 * each hash matches its own record's content is checked by the codec when the record is read (a mismatch
 * makes an invalid {@link Entry} whose problem names the {@code hash} field).
 */
public final class ChainCheck {

    private ChainCheck() {
    }

    /** Findings for every broken link; a record whose previousHash or predecessor's hash is unreadable is skipped. */
    public static List<Finding> check(List<Entry> entries) {
        List<Finding> findings = new ArrayList<>();
        for (int i = 0; i < entries.size(); i++) {
            Entry entry = entries.get(i);
            String expected = i == 0 ? genesisIfFirst(entry) : entries.get(i - 1).hash();
            String actual = entry.previousHash();
            if (expected != null && actual != null && !expected.equals(actual)) {
                findings.add(Finding.of(i, entry, Check.CHAIN, "previousHash", i == 0
                        ? "is " + actual + " but the first record of a chain must link to 64 zeros"
                        : "is " + actual + " but the record read before it (" + entries.get(i - 1).describe()
                                + ") has hash " + expected));
            }
        }
        return findings;
    }

    /** Genesis for a first record numbered 1; unknown for a chain read from the middle (reported by sequence). */
    private static String genesisIfFirst(Entry entry) {
        return entry.sequence() != null && entry.sequence() == 1 ? HashChain.GENESIS : null;
    }
}
