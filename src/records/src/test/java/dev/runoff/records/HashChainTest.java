package dev.runoff.records;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNotEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.runoff.records.avro.ArmState;
import dev.runoff.records.avro.DecisionRecord;
import dev.runoff.records.avro.StudentTParams;
import java.nio.charset.StandardCharsets;
import java.util.ArrayList;
import java.util.List;
import java.util.OptionalInt;
import java.util.Set;
import org.apache.avro.Schema;
import org.apache.avro.generic.GenericData;
import org.apache.avro.generic.IndexedRecord;
import org.apache.avro.specific.SpecificData;
import org.junit.jupiter.api.Test;

class HashChainTest {

    @Test
    void sha256MatchesTheFipsExamples() {
        // FIPS 180-2, Appendix B.1 (one-block message "abc").
        assertEquals("ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad",
                HashChain.sha256Hex(ascii("abc")));
        // FIPS 180-2, Appendix B.2 (multi-block message), from memory.
        assertEquals("248d6a61d20638b8e5c026930c3e6039a33ce45964ff2167f6ecedd419db06c1",
                HashChain.sha256Hex(ascii("abcdbcdecdefdefgefghfghighijhijkijkljklmklmnlmnomnopnopq")));
        // SHA-256 of the empty message, a widely published value (from memory).
        assertEquals("e3b0c44298fc1c149afbf4c8996fb92427ae41e4649b934ca495991b7852b855",
                HashChain.sha256Hex(new byte[0]));
    }

    @Test
    void hashesMatchAnIndependentImplementation() {
        // Computed outside Java from the records' JSON output by the README's Python script ("Checking the hash
        // chain without Java": standard library json + hashlib, ECMAScript number formatting). Confirmed
        // separately by Node.js (JSON.stringify with sorted keys + crypto SHA-256, the seed kept as text since
        // it exceeds 2^53). The first sample holds a startedAt, the second a null one.
        assertEquals("5a49ef7b537fb6faefc8bca0f7a0cb5e743f24b29763b6d93a2321fa59a18472",
                HashChain.hashOf(Samples.decision()));
        assertEquals("dcee4a000154fce6d29c4262ecf20a652e687b4edda49203c700b26cbd186554",
                HashChain.hashOf(Samples.valueDecision()));
    }

    @Test
    void hashIsStableAcrossCallsAndWireFormats() {
        DecisionRecord record = Samples.decision();
        RecordCodec<DecisionRecord> codec = RecordCodec.decisionRecords();
        DecisionRecord viaAvro = codec.decode(codec.encode(record), Samples.NOW).orThrow();
        DecisionRecord viaJson = codec.decode(codec.encode(record, Format.JSON), Samples.NOW).orThrow();
        assertEquals(record.getHash(), HashChain.hashOf(record));
        assertEquals(record.getHash(), HashChain.hashOf(viaAvro));
        assertEquals(record.getHash(), HashChain.hashOf(viaJson));
    }

    @Test
    void hashChangesWhenAnyFieldChanges() {
        DecisionRecord original = Samples.decision();
        String hash = HashChain.hashOf(original);
        List<String> changed = new ArrayList<>();
        for (List<Object> path : leafPaths(original, original.getSchema(), new ArrayList<>())) {
            if (path.equals(List.of("hash"))) {
                continue;
            }
            DecisionRecord copy = DecisionRecord.newBuilder(original).build();
            mutate(copy, path);
            assertNotEquals(hash, HashChain.hashOf(copy), "changing " + path + " kept the hash");
            changed.add(path.toString());
        }
        // The walk reached into the embedded definition, the last arm's posterior and the top level.
        assertTrue(changed.contains("[definition, metric, prior, b]"), changed.toString());
        assertTrue(changed.contains("[arms, 2, posterior, b]"), changed.toString());
        assertTrue(changed.contains("[previousHash]"), changed.toString());
    }

    @Test
    void hashChangesWhenANullFieldGetsAValue() {
        DecisionRecord original = Samples.decision();
        String hash = HashChain.hashOf(original);
        DecisionRecord withWinner = DecisionRecord.newBuilder(original).setWinner("green").build();
        assertNotEquals(hash, HashChain.hashOf(withWinner));
        DecisionRecord withMean = DecisionRecord.newBuilder(original).build();
        withMean.getArms().get(0).setMean(0.0);
        assertNotEquals(hash, HashChain.hashOf(withMean));
    }

    @Test
    void hashFieldItselfIsLeftOut() {
        DecisionRecord record = Samples.decision();
        String hash = HashChain.hashOf(record);
        record.setHash("f".repeat(64));
        assertEquals(hash, HashChain.hashOf(record));
    }

    @Test
    void aSealedRecordChangedAfterwardsIsHashedAnew() {
        // Sealing remembers the record's content with its hash (the codec checks the hash again before
        // writing); a change to that very record, at any leaf, must still give the hash of the new content.
        DecisionRecord unsealed = Samples.decisionUnsealed();
        DecisionRecord probe = HashChain.seal(unsealed, HashChain.GENESIS);
        int changed = 0;
        for (List<Object> path : leafPaths(probe, probe.getSchema(), new ArrayList<>())) {
            if (path.equals(List.of("hash"))) {
                continue;
            }
            DecisionRecord sealed = HashChain.seal(unsealed, HashChain.GENESIS);
            String hash = sealed.getHash();
            mutate(sealed, path);
            assertEquals(hashFromScratch(sealed), HashChain.hashOf(sealed), path.toString());
            assertNotEquals(hash, HashChain.hashOf(sealed), "changing " + path + " kept the hash");
            changed++;
        }
        assertTrue(changed > 40, "leaves changed: " + changed);
    }

    @Test
    void aSealedRecordWithAnotherArmOrAnotherPosteriorKindIsHashedAnew() {
        DecisionRecord unsealed = Samples.decisionUnsealed();
        DecisionRecord longer = HashChain.seal(unsealed, HashChain.GENESIS);
        String hash = longer.getHash();
        longer.getArms().add(ArmState.newBuilder(longer.getArms().get(0)).build());
        assertEquals(hashFromScratch(longer), HashChain.hashOf(longer));
        assertNotEquals(hash, HashChain.hashOf(longer));

        DecisionRecord other = HashChain.seal(unsealed, HashChain.GENESIS);
        other.getArms().get(0).setPosterior(new StudentTParams(2.0, 3.0, 4.0));
        assertEquals(hashFromScratch(other), HashChain.hashOf(other));
        assertNotEquals(hash, HashChain.hashOf(other));
    }

    @Test
    void theCodecRefusesASealedRecordChangedAfterwards() {
        DecisionRecord unsealed = Samples.decisionUnsealed();
        DecisionRecord sealed = HashChain.seal(unsealed, HashChain.GENESIS);
        RecordCodec<DecisionRecord> codec = RecordCodec.decisionRecords();
        codec.encode(sealed);
        sealed.setStreamTime(sealed.getStreamTime() + 1);
        RecordRejectedException e = assertThrows(RecordRejectedException.class, () -> codec.encode(sealed));
        assertTrue(e.getMessage().contains("does not match the record's content"), e.getMessage());
    }

    @Test
    void signingASealedRecordKeepsItsHash() {
        DecisionRecord unsealed = Samples.decisionUnsealed();
        DecisionRecord sealed = HashChain.seal(unsealed, HashChain.GENESIS);
        sealed.setKeyId("k1");
        sealed.setSignature("c2lnbmF0dXJl");
        assertEquals(hashFromScratch(sealed), HashChain.hashOf(sealed));
        assertEquals(sealed.getHash(), HashChain.hashOf(sealed));
    }

    /** SHA-256 of the canonical JSON without the unhashed fields, written anew. */
    private static String hashFromScratch(DecisionRecord record) {
        return HashChain.sha256Hex(CanonicalJson.without(record, Set.of("hash", "keyId", "signature"))
                .getBytes(StandardCharsets.UTF_8));
    }

    @Test
    void chainLinksEachRecordToItsPredecessor() {
        List<DecisionRecord> chain = HashChain.chain(threeDecisions());
        assertEquals(HashChain.GENESIS, chain.get(0).getPreviousHash());
        assertEquals(chain.get(0).getHash(), chain.get(1).getPreviousHash());
        assertEquals(chain.get(1).getHash(), chain.get(2).getPreviousHash());
        assertEquals(OptionalInt.empty(), HashChain.firstBreak(chain));
        assertEquals(OptionalInt.empty(), HashChain.firstBreak(chain.subList(1, 3), chain.get(0).getHash()));
    }

    @Test
    void tamperingRemovingOrReorderingBreaksTheChain() {
        List<DecisionRecord> chain = HashChain.chain(threeDecisions());

        List<DecisionRecord> tampered = new ArrayList<>(chain);
        DecisionRecord edited = DecisionRecord.newBuilder(chain.get(1)).setStreamTime(1).build();
        tampered.set(1, edited);
        assertEquals(OptionalInt.of(1), HashChain.firstBreak(tampered));

        List<DecisionRecord> resealed = new ArrayList<>(chain);
        resealed.set(1, HashChain.seal(edited, chain.get(0).getHash()));
        assertEquals(OptionalInt.of(2), HashChain.firstBreak(resealed));

        assertEquals(OptionalInt.of(1), HashChain.firstBreak(List.of(chain.get(0), chain.get(2))));
        assertEquals(OptionalInt.of(0), HashChain.firstBreak(List.of(chain.get(1), chain.get(0), chain.get(2))));
    }

    @Test
    void sealingNeedsAWellFormedPreviousHash() {
        assertThrows(IllegalArgumentException.class, () -> HashChain.seal(Samples.decisionUnsealed(), "abc"));
        assertThrows(IllegalArgumentException.class,
                () -> HashChain.seal(Samples.decisionUnsealed(), "A".repeat(64)));
    }

    private static List<DecisionRecord> threeDecisions() {
        List<DecisionRecord> records = new ArrayList<>();
        for (int i = 1; i <= 3; i++) {
            records.add(DecisionRecord.newBuilder(Samples.decisionUnsealed()).setSequence(i)
                    .setStreamTime(Samples.NOW + i * 60_000L).build());
        }
        return records;
    }

    /** Paths (field names and list indexes) to every non-null leaf value under {@code value}. */
    private static List<List<Object>> leafPaths(Object value, Schema schema, List<Object> prefix) {
        List<List<Object>> paths = new ArrayList<>();
        if (value == null) {
            return paths;
        }
        Schema actual = schema.getType() == Schema.Type.UNION
                ? schema.getTypes().get(GenericData.get().resolveUnion(schema, value)) : schema;
        switch (actual.getType()) {
            case RECORD -> {
                for (Schema.Field field : actual.getFields()) {
                    paths.addAll(leafPaths(((IndexedRecord) value).get(field.pos()), field.schema(),
                            append(prefix, field.name())));
                }
            }
            case ARRAY -> {
                List<?> items = (List<?>) value;
                for (int i = 0; i < items.size(); i++) {
                    paths.addAll(leafPaths(items.get(i), actual.getElementType(), append(prefix, i)));
                }
            }
            default -> paths.add(prefix);
        }
        return paths;
    }

    private static List<Object> append(List<Object> prefix, Object step) {
        List<Object> path = new ArrayList<>(prefix);
        path.add(step);
        return path;
    }

    /** Changes the leaf at {@code path} of {@code root} to a different value of the same type. */
    @SuppressWarnings("unchecked")
    private static void mutate(IndexedRecord root, List<Object> path) {
        Object parent = root;
        for (int i = 0; i < path.size() - 1; i++) {
            parent = step(parent, path.get(i));
        }
        Object last = path.get(path.size() - 1);
        Object old = step(parent, last);
        Object changed = changedValue(old);
        if (last instanceof Integer index) {
            ((List<Object>) parent).set(index, changed);
        } else {
            IndexedRecord record = (IndexedRecord) parent;
            record.put(record.getSchema().getField((String) last).pos(), changed);
        }
    }

    private static Object step(Object container, Object step) {
        if (step instanceof Integer index) {
            return ((List<?>) container).get(index);
        }
        IndexedRecord record = (IndexedRecord) container;
        return record.get(record.getSchema().getField((String) step).pos());
    }

    private static Object changedValue(Object old) {
        if (old instanceof Long l) {
            return l + 1;
        }
        if (old instanceof Integer i) {
            return i + 1;
        }
        if (old instanceof Double d) {
            return d + 0.25;
        }
        if (old instanceof String s) {
            return s + "x";
        }
        if (old instanceof Enum<?> e) {
            Object[] symbols = e.getDeclaringClass().getEnumConstants();
            return symbols[(e.ordinal() + 1) % symbols.length];
        }
        throw new IllegalStateException("no change defined for " + old + " of " + SpecificData.get().induce(old));
    }

    private static byte[] ascii(String text) {
        return text.getBytes(StandardCharsets.US_ASCII);
    }
}
