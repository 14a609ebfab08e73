package dev.runoff.audit;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNotEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.runoff.engine.EngineVersion;
import dev.runoff.records.HashChain;
import dev.runoff.records.avro.DecisionRecord;
import dev.runoff.records.avro.StoppingRule;
import dev.runoff.records.avro.StoppingSpec;
import dev.runoff.records.avro.ExperimentDefinition;
import java.util.EnumMap;
import java.util.List;
import java.util.Map;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;

/**
 * Records of every supported engine version verify bit for bit, each recomputed with the engine it names; a
 * record relabelled with another supported version is a recomputation finding where the versions' draw
 * policies differ; an unsupported version is a finding that names the supported ones.
 */
class EngineVersionVerificationTest {

    private static final List<String> ARMS = List.of("harbour", "lighthouse", "dunes");
    private static final double[] RATES = {0.04, 0.05, 0.09};
    private static final Map<EngineVersion, List<DecisionRecord>> CHAINS = new EnumMap<>(EngineVersion.class);
    private static final Map<EngineVersion, List<DecisionRecord>> POSTERIOR_CHAINS = new EnumMap<>(EngineVersion.class);

    @BeforeAll
    static void runTheJobWithEachVersion() {
        ExperimentDefinition glr = SimulatedJob.definition("coastal-tours", ARMS, 0);
        ExperimentDefinition posterior = ExperimentDefinition.newBuilder(glr).setExperimentId("coastal-tours-posterior")
                .setStopping(StoppingSpec.newBuilder(glr.getStopping()).setRule(StoppingRule.POSTERIOR).build())
                .build();
        for (EngineVersion version : EngineVersion.values()) {
            CHAINS.put(version, SimulatedJob.run(glr, round -> RATES, 30, 600, 11, version));
            POSTERIOR_CHAINS.put(version, SimulatedJob.run(posterior, round -> RATES, 30, 600, 11, version));
        }
    }

    private static ExperimentAudit verify(List<DecisionRecord> records) {
        List<ExperimentAudit> audits = new Verifier(0.001).verify(Chains.entries(records));
        assertEquals(1, audits.size());
        return audits.get(0);
    }

    private static List<DecisionRecord> relabelled(List<DecisionRecord> records, String version) {
        return HashChain.chain(records.stream().map(r -> DecisionRecord.newBuilder(r).setEngineVersion(version)
                .build()).toList());
    }

    @Test
    void recordsOfEverySupportedVersionVerifyBitForBit() {
        for (EngineVersion version : EngineVersion.values()) {
            for (List<DecisionRecord> chain : List.of(CHAINS.get(version), POSTERIOR_CHAINS.get(version))) {
                assertTrue(chain.size() >= 3, version.label() + ": several decisions, got " + chain.size());
                assertTrue(chain.stream().allMatch(r -> r.getEngineVersion().equals(version.label())),
                        "every record names " + version.label());
                ExperimentAudit audit = verify(chain);
                assertTrue(audit.passed(), version.label() + ": " + audit.findings());
                assertEquals(chain.size(), audit.reproduced(), version.label());
            }
        }
    }

    @Test
    void theVersionsDrawDifferently() {
        // the premise of the relabelling test below: the two policies give records that differ (the job's cap
        // here is 2,000 draws: 1.2 makes them in one stage, 1.3 in one of 1,000 and, unless settled, a second)
        assertNotEquals(CHAINS.get(EngineVersion.V1_2).stream().map(DecisionRecord::getDraws).toList(),
                CHAINS.get(EngineVersion.V1_3).stream().map(DecisionRecord::getDraws).toList());
    }

    @Test
    void aRecordRelabelledWithAnotherSupportedVersionIsARecomputationFinding() {
        for (EngineVersion from : EngineVersion.values()) {
            for (EngineVersion to : EngineVersion.values()) {
                if (from == to) {
                    continue;
                }
                List<DecisionRecord> forged = relabelled(CHAINS.get(from), to.label());
                assertTrue(HashChain.firstBreak(forged).isEmpty(), "the forger rebuilt the chain");
                ExperimentAudit audit = verify(forged);
                Finding first = audit.firstFailure().orElseThrow(() -> new AssertionError(from.label() + " as "
                        + to.label() + " passed"));
                assertEquals(Check.RECOMPUTATION, first.check(), first.toString());
                assertNotEquals("engineVersion", first.field(), first.toString());
                assertTrue(first.message().contains("engine version " + to.label() + " (the record's)"),
                        first.message());
                assertTrue(audit.reproduced() < forged.size(), from.label() + " as " + to.label());
            }
        }
    }

    @Test
    void anUnsupportedVersionIsAFindingNamingTheSupportedOnes() {
        List<DecisionRecord> forged = relabelled(CHAINS.get(EngineVersion.CURRENT), "1.1");
        ExperimentAudit audit = verify(forged);
        assertEquals(0, audit.reproduced());
        Finding first = audit.firstFailure().orElseThrow();
        assertEquals(Check.RECOMPUTATION, first.check());
        assertEquals("engineVersion", first.field());
        assertTrue(first.message().contains("engine version 1.1") && first.message().contains("1.2, 1.3"),
                first.message());
    }
}
