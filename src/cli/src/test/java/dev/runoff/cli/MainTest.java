package dev.runoff.cli;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.runoff.engine.AllocationEngine;
import org.junit.jupiter.api.Test;

/** The program's top level: subcommands, help, version and usage errors. */
class MainTest {

    @Test
    void helpListsTheEvaluateCommand() {
        EvaluateCommandTest.Run r = EvaluateCommandTest.run("--help");
        assertEquals(0, r.exitCode());
        assertTrue(r.out().contains("Usage: runoff"), r.out());
        assertTrue(r.out().contains("evaluate"), r.out());
    }

    @Test
    void evaluateHelpDescribesItsOptions() {
        EvaluateCommandTest.Run r = EvaluateCommandTest.run("evaluate", "--help");
        assertEquals(0, r.exitCode());
        for (String option : new String[] {"--arm", "--metric", "--method", "--draws", "--seed", "--rule", "--beta",
            "--prior", "--json"}) {
            assertTrue(r.out().contains(option), option);
        }
    }

    @Test
    void versionNamesTheEngineVersion() {
        EvaluateCommandTest.Run r = EvaluateCommandTest.run("--version");
        assertEquals(0, r.exitCode());
        assertTrue(r.out().startsWith("runoff "), r.out());
        assertTrue(r.out().contains("engine " + AllocationEngine.VERSION), r.out());
    }

    @Test
    void noCommandIsAUsageError() {
        EvaluateCommandTest.Run r = EvaluateCommandTest.run();
        assertEquals(2, r.exitCode());
        assertEquals("runoff: missing command (try 'runoff --help')\n", r.err().replace("\r\n", "\n"));
    }

    @Test
    void unknownCommandIsAOneLineUsageError() {
        EvaluateCommandTest.Run r = EvaluateCommandTest.run("evalute", "--arm", "a=1/2");
        assertEquals(2, r.exitCode());
        assertEquals(1, r.err().lines().count(), r.err());
        assertTrue(r.err().startsWith("runoff: Unmatched argument"), r.err());
    }
}
