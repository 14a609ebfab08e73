package dev.runoff.audit;

import dev.runoff.testkit.SeededRandom;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertNotEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.runoff.records.Ed25519;
import dev.runoff.records.RecordSignatures;
import dev.runoff.records.SignatureVerifier;
import dev.runoff.records.avro.Decision;
import dev.runoff.records.avro.DecisionRecord;
import java.util.ArrayList;
import java.util.List;
import java.util.Set;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;

/**
 * Signatures against the forgery the hash chain alone cannot catch, and key rotation.
 */
class SignedChainTest {

    private static final List<String> ARMS = List.of("control", "green", "blue");
    private static final double[] RATES = {0.04, 0.05, 0.09};
    private static final double[] INVENTED = {0.09, 0.05, 0.04};
    private static final int FORGED_FROM = 3;

    private static Ed25519.Pair job;
    private static Ed25519.Pair next;
    private static List<DecisionRecord> genuine;

    @BeforeAll
    static void runJob() {
        job = Ed25519.generate("job-1", SeededRandom.secure(1));
        next = Ed25519.generate("job-2", SeededRandom.secure(2));
        genuine = signed(SimulatedJob.run(SimulatedJob.definition("checkout", ARMS, 0), RATES, 40, 600, 11), job,
                job, Integer.MAX_VALUE);
    }


    /** {@code records} signed by {@code first} before index {@code switchAt}, by {@code second} from there on. */
    static List<DecisionRecord> signed(List<DecisionRecord> records, Ed25519.Pair first, Ed25519.Pair second,
                                       int switchAt) {
        List<DecisionRecord> out = new ArrayList<>();
        for (int i = 0; i < records.size(); i++) {
            out.add(RecordSignatures.sign(records.get(i), (i < switchAt ? first : second).signing()));
        }
        return out;
    }

    private static ExperimentAudit verify(List<DecisionRecord> records, SignatureVerifier keys) {
        return new Verifier(0.001, keys).verifyExperiment("checkout", Chains.entries(records));
    }

    /**
     * The forgery of issue 13: keep the first records, invent counts from record k on (here: the click rates of
     * the worst and best arms swapped), recompute with the project's own evaluation code, which reseals the
     * chain, and keep the key ids and signatures of the genuine records at the same places.
     */
    private static List<DecisionRecord> forged() {
        List<DecisionRecord> resealed = SimulatedJob.run(SimulatedJob.definition("checkout", ARMS, 0),
                round -> round + 1 < FORGED_FROM ? RATES : INVENTED, 40, 600, 11);
        List<DecisionRecord> out = new ArrayList<>();
        for (int i = 0; i < resealed.size(); i++) {
            DecisionRecord copyFrom = genuine.get(Math.min(i, genuine.size() - 1));
            out.add(DecisionRecord.newBuilder(resealed.get(i)).setKeyId(copyFrom.getKeyId())
                    .setSignature(copyFrom.getSignature()).build());
        }
        return out;
    }

    @Test
    void genuineSignedChainVerifiesWithTheKey() {
        ExperimentAudit audit = verify(genuine, SignatureVerifier.of(List.of(job.verification())));
        assertTrue(audit.passed(), audit.findings().toString());
        assertEquals(genuine.size(), audit.reproduced());
    }

    @Test
    void forgeryPassesWithoutAKeyAndFailsAtRecordKWithIt() {
        List<DecisionRecord> forged = forged();
        assertEquals(genuine.subList(0, FORGED_FROM), forged.subList(0, FORGED_FROM), "records before k are kept");
        assertNotEquals(genuine.get(FORGED_FROM).getArms(), forged.get(FORGED_FROM).getArms(), "counts invented");
        DecisionRecord last = forged.get(forged.size() - 1);
        assertEquals(Decision.STOP, last.getDecision());
        assertNotEquals(genuine.get(genuine.size() - 1).getWinner(), last.getWinner(), "another winner");

        ExperimentAudit unkeyed = new Verifier(0.001).verifyExperiment("checkout", Chains.entries(forged));
        assertTrue(unkeyed.passed(), "documented limitation: without a key the forgery verifies "
                + unkeyed.findings());
        assertEquals(forged.size(), unkeyed.reproduced());

        ExperimentAudit keyed = verify(forged, SignatureVerifier.of(List.of(job.verification())));
        Finding first = keyed.firstFailure().orElseThrow();
        assertEquals(Check.SIGNATURE, first.check());
        assertEquals((long) FORGED_FROM + 1, first.sequence(), "record k is sequence k + 1");
        assertTrue(first.message().contains("job-1"), first.message());
        assertTrue(keyed.findings().stream().allMatch(f -> f.check() == Check.SIGNATURE), keyed.findings().toString());
    }

    @Test
    void unsignedRecordsFailWithAKey() {
        List<DecisionRecord> unsigned = SimulatedJob.run(SimulatedJob.definition("checkout", ARMS, 0), RATES, 40,
                600, 11);
        ExperimentAudit audit = verify(unsigned, SignatureVerifier.of(List.of(job.verification())));
        assertEquals(unsigned.size(), audit.findings().size());
        assertTrue(audit.firstFailure().orElseThrow().message().contains("not signed"));
    }

    @Test
    void rotatedChainVerifiesWithBothKeysAndFailsWithOne() {
        int switchAt = genuine.size() / 2;
        List<DecisionRecord> rotated = signed(genuine, job, next, switchAt);
        SignatureVerifier both = SignatureVerifier.of(List.of(job.verification(), next.verification()));
        assertTrue(verify(rotated, both).passed(), verify(rotated, both).findings().toString());

        Finding onlyOld = verify(rotated, SignatureVerifier.of(List.of(job.verification()))).firstFailure()
                .orElseThrow();
        assertEquals((long) switchAt + 1, onlyOld.sequence());
        assertEquals("keyId", onlyOld.field());
        assertTrue(onlyOld.message().contains("'job-2'") && onlyOld.message().contains("unknown or retired"),
                onlyOld.message());

        ExperimentAudit onlyNew = verify(rotated, SignatureVerifier.of(List.of(next.verification())));
        assertEquals(1L, onlyNew.firstFailure().orElseThrow().sequence());
        assertTrue(onlyNew.firstFailure().orElseThrow().message().contains("'job-1'"));
        assertEquals(switchAt, onlyNew.findings().size());
        assertFalse(onlyNew.passed());
        assertEquals(Set.of("job-2"), SignatureVerifier.of(List.of(next.verification())).keyIds());
    }
}
