package dev.runoff.audit;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.runoff.testkit.RepositoryFiles;
import java.nio.file.Path;
import java.util.List;
import org.junit.jupiter.api.Test;

/**
 * Decision records written by engine 1.2, kept in the repository, verify bit for bit: a change to 1.2's
 * arithmetic, or to record building that records already written cannot follow, fails here. The file holds the
 * ten records of a simulated job (three arms, click rates 4%, 5% and 9%, 600 visitors per period, the job's cap of
 * 40,000 draws: the first record, with nothing counted, took the cap in stages, the others 10,000), written by
 * {@code SimulatedJob} with engine 1.2 when engine 1.3 was added; it must never be regenerated.
 */
class Engine12FixtureTest {
    private static final String FILE = "src/audit/src/test/resources/fixtures/engine-1.2-coastal-tours.jsonl";

    @Test
    void checkedInEngine12RecordsVerifyBitForBit() {
        Path file = RepositoryFiles.resolve(FILE);
        List<Entry> entries = new FileSource(file, new EntryDecoder(Chains.T0)).read("coastal-tours");
        assertEquals(10, entries.size());
        assertTrue(entries.stream().allMatch(e -> e.isValid() && "1.2".equals(e.record().getEngineVersion())),
                "ten valid engine 1.2 records");
        assertEquals(40_000, entries.get(0).record().getDraws(), "the first record drew in stages up to the cap");
        ExperimentAudit audit = new Verifier(0.001).verifyExperiment("coastal-tours", entries);
        assertTrue(audit.passed(), audit.findings().toString());
        assertEquals(entries.size(), audit.reproduced());
    }
}
