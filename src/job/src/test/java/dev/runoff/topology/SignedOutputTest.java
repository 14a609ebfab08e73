package dev.runoff.topology;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.runoff.records.Ed25519;
import dev.runoff.records.HashChain;
import dev.runoff.records.RecordSigner;
import dev.runoff.records.SignatureVerifier;
import dev.runoff.records.avro.AllocationUpdate;
import dev.runoff.records.avro.DecisionRecord;
import dev.runoff.testkit.TestDefinitions;
import java.security.SecureRandom;
import java.util.List;
import org.junit.jupiter.api.Test;

/** The job signs every decision and control record it writes, and the hash chain does not depend on it. */
class SignedOutputTest {

    private static final Ed25519.Pair KEY = Ed25519.generate("job-1", new SecureRandom());
    private static final SignatureVerifier TRUSTED = SignatureVerifier.of(List.of(KEY.verification()));

    private static List<DecisionRecord> decisionsOf(TopologyFixture job) {
        job.define(TestDefinitions.bernoulli("layout", "a", "b", "c"));
        job.advance(150);
        job.define(TestDefinitions.bernoulli("layout", "a", "b"));
        job.advance(150);
        return job.decisions();
    }

    @Test
    void everyOutputRecordIsSignedByTheJobsKey() {
        try (TopologyFixture job = new TopologyFixture(TopologyFixture.SETTINGS, RecordSigner.with(KEY.signing()))) {
            List<DecisionRecord> decisions = decisionsOf(job);
            List<AllocationUpdate> updates = job.allocations();
            assertEquals(2, decisions.size());
            assertEquals(2, updates.size());
            for (DecisionRecord d : decisions) {
                assertTrue(TRUSTED.check(d).valid(), TRUSTED.check(d).message());
            }
            for (AllocationUpdate u : updates) {
                assertTrue(TRUSTED.check(u).valid(), TRUSTED.check(u).message());
            }
            assertTrue(HashChain.firstBreak(decisions).isEmpty());
        }
    }

    @Test
    void withoutASignerRecordsAreUnsignedAndHashTheSame() {
        List<DecisionRecord> signed;
        try (TopologyFixture job = new TopologyFixture(TopologyFixture.SETTINGS, RecordSigner.with(KEY.signing()))) {
            signed = decisionsOf(job);
        }
        try (TopologyFixture job = new TopologyFixture()) {
            List<DecisionRecord> unsigned = decisionsOf(job);
            assertNull(unsigned.get(0).getSignature());
            assertFalse(TRUSTED.check(job.allocations().get(0)).valid());
            assertEquals(signed.stream().map(DecisionRecord::getHash).toList(),
                    unsigned.stream().map(DecisionRecord::getHash).toList());
        }
    }
}
