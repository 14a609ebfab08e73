package dev.runoff.client;

import dev.runoff.testkit.SeededRandom;

import static dev.runoff.client.ControlRecords.NOW;
import static dev.runoff.client.ControlRecords.VALID_UNTIL;
import static dev.runoff.client.ControlRecords.avro;
import static dev.runoff.client.ControlRecords.json;
import static dev.runoff.client.ControlRecords.running;
import static dev.runoff.client.ControlRecords.stopped;
import static dev.runoff.client.ControlRecords.validUntil;
import static dev.runoff.client.ControlRecords.version;
import static org.junit.jupiter.api.Assertions.assertEquals;

import dev.runoff.records.Ed25519;
import dev.runoff.records.RecordSignatures;
import dev.runoff.records.SignatureVerifier;
import dev.runoff.records.avro.AllocationUpdate;
import java.util.List;
import org.junit.jupiter.api.Test;

/** A table that verifies signatures: forged control records are skipped and counted, never applied. */
class SignedControlRecordsTest {

    private final MutableClock clock = new MutableClock(NOW);
    private final Ed25519.Pair job = Ed25519.generate("job-1", SeededRandom.secure(1));
    private final Ed25519.Pair rotated = Ed25519.generate("job-2", SeededRandom.secure(2));
    private final Ed25519.Pair forger = Ed25519.generate("job-1", SeededRandom.secure(3));
    private final AllocationTable table = AllocationTable.create(
            PickPolicy.builder("fallback").staleFallback(StaleFallback.DEFAULT_ARM).build(), clock,
            SignatureVerifier.of(List.of(job.verification(), rotated.verification())));


    private AllocationUpdate byJob(AllocationUpdate record) {
        return RecordSignatures.sign(record, job.signing());
    }

    @Test
    void recordsSignedByATrustedKeyAreApplied() {
        assertEquals(ControlRecordOutcome.APPLIED, table.apply("e", avro(byJob(running("e", 1, "a", 1.0, "b", 0.0)))));
        assertEquals(ControlRecordOutcome.APPLIED, table.apply("e",
                json(RecordSignatures.sign(running("e", 2, "a", 1.0, "b", 0.0), rotated.signing()))));
        assertEquals("a", table.pick("e", "u"));
        assertEquals(0, table.metrics().unverifiedRecords());
    }

    @Test
    void forgedRecordsAreNotAppliedAndAreCounted() {
        table.apply("e", avro(byJob(running("e", 1, "a", 1.0, "b", 0.0))));
        AllocationUpdate flip = running("e", 2, "a", 0.0, "b", 1.0);
        List<AllocationUpdate> forged = List.of(
                flip,
                RecordSignatures.sign(flip, forger.signing()),
                RecordSignatures.sign(flip, Ed25519.generate("other", SeededRandom.secure(4)).signing()),
                AllocationUpdate.newBuilder(byJob(running("e", 2, "a", 1.0, "b", 0.0)))
                        .setWeights(flip.getWeights()).build(),
                RecordSignatures.sign(version(flip, Long.MAX_VALUE), forger.signing()),
                RecordSignatures.sign(validUntil(stopped("e", 3, "b", "a", 0.0, "b", 1.0), Long.MAX_VALUE),
                        forger.signing()),
                validUntil(stopped("e", 3, "b", "a", 0.0, "b", 1.0), Long.MAX_VALUE));
        for (AllocationUpdate record : forged) {
            assertEquals(ControlRecordOutcome.UNVERIFIED, table.apply("e", avro(record)), record.toString());
        }
        assertEquals(forged.size(), table.metrics().unverifiedRecords());
        assertEquals(1, table.metrics().recordsApplied());
        assertEquals(1, table.current("e").orElseThrow().getSequence());
        assertEquals("a", table.pick("e", "u"));
    }

    @Test
    void aSignedStoppedRecordStillObeysValidUntil() {
        table.apply("e", avro(byJob(stopped("e", 1, "b", "a", 0.0, "b", 1.0))));
        assertEquals("b", table.pick("e", "u"));
        clock.set(VALID_UNTIL + 1);
        assertEquals("fallback", table.pick("e", "u"));
        assertEquals(1, table.metrics().stalePicks());
    }
}
