package dev.runoff.audit;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.runoff.records.CanonicalJson;
import dev.runoff.records.RecordCodec;
import dev.runoff.records.avro.DecisionRecord;
import java.io.IOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

class EntryDecoderTest {

    private static final EntryDecoder DECODER = new EntryDecoder(Chains.T0);

    private static List<DecisionRecord> chain() {
        return Chains.chain("exp", List.of("a", "b", "c"), Chains.repeat(new double[] {0.2, 0.3, 0.5}, 4),
                Chains.repeat(new double[] {0.2, 0.3, 0.5}, 4), 50, 3, false);
    }

    @Test
    void alteredJsonFieldFailsTheHashAndKeepsTheSequence() {
        DecisionRecord record = chain().get(2);
        String line = CanonicalJson.of(record).replace("\"trials\":" + record.getArms().get(1).getTrials(),
                "\"trials\":" + (record.getArms().get(1).getTrials() + 1));
        Entry entry = DECODER.decode(line.getBytes(StandardCharsets.UTF_8), null, Position.line(3));
        assertFalse(entry.isValid());
        assertEquals(3L, entry.sequence());
        assertEquals("exp", entry.experimentId());
        assertEquals(record.getHash(), entry.hash());
        assertEquals("hash", entry.problems().get(0).field());
    }

    @Test
    void alteredAvroFieldFailsTheHashAndKeepsTheIdentity() throws IOException {
        DecisionRecord record = DecisionRecord.newBuilder(chain().get(1)).setStreamTime(Chains.T0 + 1).build();
        byte[] bytes = record.toByteBuffer().array();
        Entry entry = DECODER.decode(bytes, "exp", new Position(0, 1));
        assertFalse(entry.isValid());
        assertEquals(2L, entry.sequence());
        assertEquals(record.getPreviousHash(), entry.previousHash());
        assertEquals("hash", entry.problems().get(0).field());
    }

    @Test
    void validAvroAndJsonDecodeToTheSameRecord() {
        DecisionRecord record = chain().get(3);
        RecordCodec<DecisionRecord> codec = RecordCodec.decisionRecords();
        Entry avro = DECODER.decode(codec.encode(record), "exp", new Position(0, 3));
        Entry json = DECODER.decode(CanonicalJson.of(record).getBytes(StandardCharsets.UTF_8), null,
                Position.line(4));
        assertEquals(record, avro.record());
        assertEquals(record, json.record());
    }

    @Test
    void keyOtherThanTheExperimentIsAProblem() {
        Entry entry = DECODER.decode(RecordCodec.decisionRecords().encode(chain().get(0)), "other",
                new Position(2, 0));
        assertFalse(entry.isValid());
        assertEquals("experimentId", entry.problems().get(0).field());
        assertEquals("other", entry.experimentId());
    }

    @Test
    void unreadableLineHasNoIdentity() {
        Entry entry = DECODER.decode("{not json".getBytes(StandardCharsets.UTF_8), null, Position.line(9));
        assertFalse(entry.isValid());
        assertNull(entry.sequence());
        assertNull(entry.experimentId());
        assertEquals("line 9", entry.describe());
    }

    @Test
    void tombstoneIsAProblemNotACrash() {
        Entry entry = DECODER.decode(null, "exp", new Position(0, 7));
        assertFalse(entry.isValid());
        assertEquals("exp", entry.experimentId());
    }

    @Test
    void fileSourceKeepsLineNumbersAndFiltersByExperiment(@TempDir Path dir) throws IOException {
        List<DecisionRecord> one = chain();
        List<DecisionRecord> other = Chains.chain("other", List.of("x", "y"), Chains.repeat(new double[] {0.5, 0.5},
                2), Chains.repeat(new double[] {0.5, 0.5}, 2), 10, 4, false);
        List<String> lines = new ArrayList<>();
        lines.add(CanonicalJson.of(one.get(0)));
        lines.add("");
        lines.add(CanonicalJson.of(other.get(0)));
        lines.add(CanonicalJson.of(one.get(1)));
        Path file = Files.write(dir.resolve("decisions.jsonl"), lines, StandardCharsets.UTF_8);
        List<Entry> entries = new FileSource(file, DECODER).read("exp");
        assertEquals(List.of(Position.line(1), Position.line(4)), entries.stream().map(Entry::position).toList());
        assertTrue(entries.stream().allMatch(Entry::isValid));
        assertEquals(3, new FileSource(file, DECODER).read(null).size());
    }
}
