package dev.runoff.records;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertSame;
import static org.junit.jupiter.api.Assertions.assertThrows;

import dev.runoff.records.avro.DecisionRecord;
import org.junit.jupiter.api.Test;

/** Sealing a record straight from its builder, as the evaluator does, against sealing a built record. */
class SealFromBuilderTest {

    @Test
    void sealingTheBuilderGivesTheRecordAndHashOfSealingTheBuiltRecord() {
        DecisionRecord unsealed = Samples.decisionUnsealed();
        String previous = "ab".repeat(32);
        DecisionRecord viaRecord = HashChain.seal(unsealed, previous);
        DecisionRecord viaBuilder = HashChain.seal(DecisionRecord.newBuilder(unsealed).setHash("stale")
                .setKeyId("key-1").setSignature("c2ln"), previous);
        assertEquals(viaRecord, viaBuilder);
        assertEquals(viaRecord.getHash(), viaBuilder.getHash());
        assertEquals(previous, viaBuilder.getPreviousHash());
        assertNull(viaBuilder.getKeyId());
        assertNull(viaBuilder.getSignature());
        // The hash of the sample computed outside Java (see HashChainTest) is reached this way too.
        assertEquals("5a49ef7b537fb6faefc8bca0f7a0cb5e743f24b29763b6d93a2321fa59a18472",
                HashChain.seal(DecisionRecord.newBuilder(unsealed), HashChain.GENESIS).getHash());
    }

    @Test
    void theSealedRecordHoldsTheBuildersValuesWithoutCopies() {
        DecisionRecord unsealed = Samples.decisionUnsealed();
        DecisionRecord sealed = HashChain.seal(DecisionRecord.newBuilder().setExperimentId("x")
                .setDefinitionVersion(1).setSequence(1).setStreamTime(1).setDefinition(unsealed.getDefinition())
                .setArms(unsealed.getArms()).setAllocationRule(unsealed.getAllocationRule()).setAllocationBeta(0.5)
                .setGuards(unsealed.getGuards()).setStoppingRule(unsealed.getStoppingRule()).setDelta(0.05)
                .setEpsilon(0.005).setDecision(unsealed.getDecision()).setReason("r").setSeed(1).setDraws(1)
                .setMethod(unsealed.getMethod()).setEngineVersion("1"), HashChain.GENESIS);
        assertSame(unsealed.getDefinition(), sealed.getDefinition());
        assertSame(unsealed.getArms(), sealed.getArms());
        assertEquals(HashChain.hashOf(DecisionRecord.newBuilder(sealed).build()), sealed.getHash());
    }

    @Test
    void aBuilderIsRefusedAnInvalidPreviousHash() {
        DecisionRecord.Builder builder = DecisionRecord.newBuilder(Samples.decisionUnsealed());
        assertThrows(IllegalArgumentException.class, () -> HashChain.seal(builder, "AB".repeat(32)));
        assertThrows(IllegalArgumentException.class, () -> HashChain.seal(builder, "ab".repeat(31)));
        assertThrows(IllegalArgumentException.class, () -> HashChain.seal(builder, "ab".repeat(31) + "ag"));
        assertThrows(IllegalArgumentException.class, () -> HashChain.seal(builder, null));
    }
}
