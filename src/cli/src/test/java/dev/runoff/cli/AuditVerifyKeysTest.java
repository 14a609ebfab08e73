package dev.runoff.cli;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.runoff.decision.Evaluator;
import dev.runoff.decision.ExperimentState;
import dev.runoff.records.CanonicalJson;
import dev.runoff.records.Definitions;
import dev.runoff.records.Ed25519;
import dev.runoff.records.Pem;
import dev.runoff.records.RecordSignatures;
import dev.runoff.records.avro.DecisionRecord;
import dev.runoff.testkit.TestDefinitions;
import java.io.IOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.security.SecureRandom;
import java.util.ArrayList;
import java.util.List;
import org.junit.jupiter.api.BeforeEach;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/** {@code audit verify --public-key} and {@code --last-hash} on a signed export. */
class AuditVerifyKeysTest {

    private static final long T0 = 1_700_000_000_000L;

    @TempDir
    Path dir;
    private Path export;
    private Path publicKey;
    private String lastHash;

    @BeforeEach
    void signedExport() throws IOException {
        Ed25519.Pair key = Ed25519.generate("job-1", new SecureRandom());
        Evaluator evaluator = new Evaluator(1_000);
        ExperimentState state = ExperimentState.start(
                Definitions.assignVersion(null, TestDefinitions.bernoulli("e", "a", "b")));
        List<String> lines = new ArrayList<>();
        for (int i = 0; i < 3; i++) {
            Evaluator.Result result = evaluator.evaluate(state, T0 + i * 60_000L);
            DecisionRecord signed = RecordSignatures.sign(result.decision(), key.signing());
            lines.add(CanonicalJson.of(signed));
            lastHash = signed.getHash();
            state = result.next();
        }
        export = Files.write(dir.resolve("decisions.jsonl"), lines, StandardCharsets.UTF_8);
        publicKey = Files.writeString(dir.resolve("decisions.jsonl.pub.pem"), Pem.write(key.verification()));
    }

    @Test
    void withoutAKeyAuthorshipIsSaidNotToBeChecked() {
        CliRun r = CliRun.of("audit", "verify", "--file", export.toString());
        assertEquals(0, r.exitCode(), r.out() + r.err());
        assertTrue(r.out().startsWith("Authorship: NOT checked (no --public-key given)"), r.out());
    }

    @Test
    void withTheKeyEverySignatureIsChecked() {
        CliRun r = CliRun.of("audit", "verify", "--file", export.toString(), "--public-key", publicKey.toString(),
                "--last-hash", "e=" + lastHash);
        assertEquals(0, r.exitCode(), r.out() + r.err());
        assertTrue(r.out().startsWith("Authorship: every signature checked against key(s) [job-1]"), r.out());
    }

    @Test
    void anotherKeyWithTheSameIdFailsNamingIt() throws IOException {
        Path other = Files.writeString(dir.resolve("other.pem"),
                Pem.write(Ed25519.generate("job-1", new SecureRandom()).verification()));
        CliRun r = CliRun.of("audit", "verify", "--file", export.toString(), "--public-key", other.toString(),
                "--json");
        assertEquals(1, r.exitCode(), r.out() + r.err());
        assertTrue(r.out().replace(" ", "").contains("\"authorshipChecked\":true"), r.out());
        assertTrue(r.out().contains("the signature by key 'job-1' does not match"), r.out());
    }

    @Test
    void aMissingLatestRecordFailsWithTheKeptHash() {
        CliRun r = CliRun.of("audit", "verify", "--file", export.toString(), "--last-hash", "e=" + "0".repeat(64));
        assertEquals(1, r.exitCode(), r.out() + r.err());
        assertTrue(r.out().contains("cut off the end"), r.out());
    }

    @Test
    void anUnreadableKeyIsAUsageError() {
        CliRun r = CliRun.of("audit", "verify", "--file", export.toString(), "--public-key",
                dir.resolve("absent.pem").toString());
        assertEquals(2, r.exitCode(), r.out() + r.err());
        assertTrue(r.err().contains("--public-key: cannot read"), r.err());
    }
}
