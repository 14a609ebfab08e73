package dev.runoff.cli;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.nio.file.Files;
import java.nio.file.Path;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/** {@code experiment validate} on value-per-unit definitions: the advice it prints and the cap it requires. */
class ExperimentValidateTest {

    private static final String PER_UNIT = """
            {"experimentId": "cabin-upsell", "arms": ["plain", "bundle"],
             "metric": {"kind": "VALUE_PER_UNIT", "valueEvent": "VALUE", "valueCap": 400}}""";

    @Test
    void aValuePerUnitDefinitionIsValidAndSaysHowToPlanIt(@TempDir Path dir) throws Exception {
        Path file = Files.writeString(dir.resolve("cabin.json"), PER_UNIT);
        CliRun run = CliRun.of("experiment", "validate", file.toString());
        assertEquals(0, run.exitCode(), run.err());
        assertTrue(run.out().startsWith("valid: cabin-upsell: 2 arms [plain, bundle], VALUE_PER_UNIT metric"),
                run.out());
        // Popoviciu's inequality on variances (from memory): a value in [0, 400] has a standard deviation of at
        // most 200
        assertTrue(run.out().contains("capped into [0, 400]; plan it with `plan --means M1,M2,... --stddev S`"),
                run.out());
        assertTrue(run.out().contains("(at most 200, half the cap)"), run.out());
    }

    @Test
    void aValuePerUnitDefinitionWithoutItsCapIsRefusedNamingTheField(@TempDir Path dir) throws Exception {
        Path file = Files.writeString(dir.resolve("cabin.json"), PER_UNIT.replace(", \"valueCap\": 400", ""));
        CliRun run = CliRun.of("experiment", "validate", file.toString());
        assertEquals(2, run.exitCode());
        assertTrue(run.err().contains("metric.valueCap: missing"), run.err());
        assertFalse(run.out().contains("note:"), run.out());
    }
}
