package dev.runoff.cli;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.IOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.List;
import java.util.Map;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import picocli.CommandLine;

/** {@code runoff run} refuses a bad configuration before touching Kafka. */
class RunCommandTest {

    @TempDir
    Path dir;

    @Test
    void aBadConfigurationPrintsEveryProblemAndExitsWithoutAStackTrace() throws IOException {
        Path config = dir.resolve("job.properties");
        Files.write(config, List.of(
                "# no bootstrap.servers at all",
                "num.stream.threads=many",
                "runoff.flush.interval.ms=-5",
                "runoff.output.format=XML",
                "runoff.http.port=http",
                "sasl.jaas.config=org.apache.kafka.common.security.plain.PlainLoginModule required password=\"pw\";",
                "acks=maybe"));
        CliRun r = CliRun.of(new CommandLine(new RunCommand(Map.of("RUNOFF_TOPIC_DECISONS", "typo"))),
                "--config", config.toString());
        assertEquals(2, r.exitCode());
        assertEquals("", r.out());
        List<String> lines = r.err().lines().toList();
        assertEquals(8, lines.size(), r.err());
        assertTrue(lines.stream().allMatch(l -> l.startsWith("run: ")), r.err());
        assertTrue(r.err().contains("num.stream.threads: invalid value 'many'"), r.err());
        assertTrue(r.err().contains("runoff.flush.interval.ms must be >= 1, got -5"), r.err());
        assertTrue(r.err().contains("runoff.output.format must be AVRO or JSON, got 'XML'"), r.err());
        assertTrue(r.err().contains("runoff.http.port must be a whole number, got 'http'"), r.err());
        // Kafka documentation (producer configs): acks is one of all, -1, 0, 1
        assertTrue(r.err().contains("acks: invalid value 'maybe'"), r.err());
        assertTrue(r.err().contains("unknown setting runoff.topic.decisons"), r.err());
        assertTrue(r.err().contains("environment variable RUNOFF_TOPIC_DECISONS"), r.err());
        assertTrue(r.err().contains("bootstrap.servers is required"), r.err());
        assertTrue(lines.get(lines.size() - 1).endsWith("7 problems in the configuration; nothing was started"),
                r.err());
        assertFalse(r.err().contains("Exception"), r.err());
        assertFalse(r.err().contains("\tat "), r.err());
        assertFalse(r.err().contains("pw"), "secret shown: " + r.err());
    }

    @Test
    void aMissingConfigFileIsReportedAsNoSuchFile() {
        Path missing = dir.resolve("nope.properties");
        CliRun r = CliRun.of("run", "--config", missing.toString());
        assertEquals(2, r.exitCode());
        assertTrue(r.err().startsWith("runoff run: "), r.err());
        assertTrue(r.err().contains("no such file: " + missing), r.err());
        assertEquals(1, r.err().lines().count(), r.err());
    }
}
