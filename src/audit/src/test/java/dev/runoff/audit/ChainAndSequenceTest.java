package dev.runoff.audit;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.runoff.records.HashChain;
import dev.runoff.records.avro.DecisionRecord;
import java.util.ArrayList;
import java.util.Collections;
import java.util.List;
import org.junit.jupiter.api.Test;

class ChainAndSequenceTest {

    private static final List<String> ARMS = List.of("a", "b");

    private static List<DecisionRecord> chain() {
        return Chains.chain("exp", ARMS, Chains.repeat(new double[] {0.5, 0.5}, 8),
                Chains.repeat(new double[] {0.5, 0.5}, 8), 100, 1, false);
    }

    @Test
    void intactChainHasNoFindings() {
        List<Entry> entries = Chains.entries(chain());
        assertEquals(List.of(), ChainCheck.check(entries));
        assertEquals(List.of(), SequenceCheck.check(entries));
        // Cross-check with the records package's own chain walk.
        assertTrue(HashChain.firstBreak(chain()).isEmpty());
    }

    @Test
    void deletedRecordIsNamedAtTheRecordAfterTheGap() {
        List<DecisionRecord> records = new ArrayList<>(chain());
        records.remove(4);
        List<Entry> entries = Chains.entries(records);
        Finding link = single(ChainCheck.check(entries));
        assertEquals(6L, link.sequence());
        assertEquals(Position.line(5), link.position());
        assertEquals("previousHash", link.field());
        Finding gap = single(SequenceCheck.check(entries));
        assertEquals(6L, gap.sequence());
        assertTrue(gap.message().contains("record 5 is missing"), gap.message());
    }

    @Test
    void swappedRecordsAreNamedAtTheFirstOfThem() {
        List<DecisionRecord> records = new ArrayList<>(chain());
        Collections.swap(records, 4, 5);
        List<Entry> entries = Chains.entries(records);
        List<Finding> sequence = SequenceCheck.check(entries);
        assertEquals(6L, sequence.get(0).sequence());
        assertEquals(Position.line(5), sequence.get(0).position());
        assertTrue(sequence.get(1).message().contains("out of order"), sequence.get(1).message());
        List<Finding> links = ChainCheck.check(entries);
        assertEquals(6L, links.get(0).sequence());
        assertEquals(Position.line(5), links.get(0).position());
    }

    @Test
    void repeatedRecordIsCalledARepeat() {
        List<DecisionRecord> records = new ArrayList<>(chain());
        records.add(3, records.get(2));
        Finding repeat = SequenceCheck.check(Chains.entries(records)).get(0);
        assertEquals(3L, repeat.sequence());
        assertEquals(Position.line(4), repeat.position());
        assertTrue(repeat.message().contains("repeat"), repeat.message());
    }

    @Test
    void chainReadFromTheMiddleReportsTheMissingStartOnce() {
        List<Entry> entries = Chains.entries(chain().subList(3, 8));
        assertEquals(List.of(), ChainCheck.check(entries));
        Finding start = single(SequenceCheck.check(entries));
        assertTrue(start.message().contains("records 1 to 3 are missing from the start"), start.message());
    }

    @Test
    void firstRecordMustLinkToGenesis() {
        List<DecisionRecord> records = new ArrayList<>(chain());
        records.set(0, HashChain.seal(records.get(0), "f".repeat(64)));
        Finding link = ChainCheck.check(Chains.entries(records)).get(0);
        assertEquals(1L, link.sequence());
        assertTrue(link.message().contains("64 zeros"), link.message());
    }

    private static Finding single(List<Finding> findings) {
        assertEquals(1, findings.size(), findings.toString());
        return findings.get(0);
    }
}
