package dev.runoff.audit;

import dev.runoff.records.RecordSignatures;
import dev.runoff.records.SignatureVerifier;
import java.util.ArrayList;
import java.util.List;

/**
 * The signature of every readable record against the trusted public keys: an unsigned record, one signed by
 * a key not in the set (unknown or retired) and one whose signature does not match its content each give a
 * finding naming the record's key id. Records the codec rejected are left to the record check.
 */
final class SignatureCheck {

    private SignatureCheck() {
    }

    static List<Finding> check(List<Entry> entries, SignatureVerifier keys) {
        List<Finding> findings = new ArrayList<>();
        for (int i = 0; i < entries.size(); i++) {
            Entry entry = entries.get(i);
            if (!entry.isValid()) {
                continue;
            }
            SignatureVerifier.Outcome outcome = keys.check(entry.record());
            if (!outcome.valid()) {
                String field = outcome.status() == SignatureVerifier.Status.UNKNOWN_KEY
                        ? RecordSignatures.KEY_ID_FIELD : RecordSignatures.SIGNATURE_FIELD;
                findings.add(Finding.of(i, entry, Check.SIGNATURE, field, outcome.message()));
            }
        }
        return findings;
    }
}
