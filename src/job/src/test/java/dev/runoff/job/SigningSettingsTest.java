package dev.runoff.job;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.runoff.records.Ed25519;
import dev.runoff.records.Pem;
import dev.runoff.records.RecordSigner;
import java.io.IOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.security.SecureRandom;
import java.util.Map;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/** The signing key's settings: validated when loaded, the key read when the job starts. */
class SigningSettingsTest {

    @TempDir
    Path dir;

    private static JobConfig config(Map<String, String> signing) {
        Map<String, String> values = new java.util.HashMap<>(signing);
        values.put("bootstrap.servers", "h:9092");
        return JobConfig.of(values);
    }

    @Test
    void withoutAKeyTheJobRefusesToStartAndSaysWhatToDo() {
        InvalidConfigException e = assertThrows(InvalidConfigException.class, () -> config(Map.of()).signing().signer());
        String message = e.problems().get(0);
        assertTrue(message.startsWith("runoff.signing.key.file is not set"), message);
        assertTrue(message.contains("openssl genpkey -algorithm ed25519"), message);
        assertTrue(message.contains("runoff.signing.required=false"), message);
    }

    @Test
    void unsignedOnlyWhenSaidExplicitly() {
        RecordSigner signer = config(Map.of(SigningSettings.REQUIRED_KEY, "false")).signing().signer();
        assertFalse(signer.signs());
    }

    @Test
    void theKeyFileAndIdGiveASigner() throws IOException {
        Path file = dir.resolve("private.pem");
        Files.writeString(file, Pem.write(Ed25519.generate("ignored-in-file", new SecureRandom()).signing()));
        RecordSigner signer = config(Map.of(SigningSettings.KEY_FILE_KEY, file.toString(),
                SigningSettings.KEY_ID_KEY, "runoff-1")).signing().signer();
        assertTrue(signer.signs());
        assertEquals("runoff-1", signer.keyId(), "the configured id wins over the file's line");
    }

    @Test
    void problemsAreReportedWhenLoadingNamingTheKey() {
        InvalidConfigException e = assertThrows(InvalidConfigException.class,
                () -> config(Map.of(SigningSettings.KEY_FILE_KEY, "/k.pem", SigningSettings.REQUIRED_KEY, "yes")));
        assertEquals(2, e.problems().size(), e.problems().toString());
        assertTrue(e.problems().get(0).startsWith("runoff.signing.required must be true or false, got 'yes'"));
        assertTrue(e.problems().get(1).startsWith("runoff.signing.key.id is required with runoff.signing.key.file"));
        e = assertThrows(InvalidConfigException.class, () -> config(Map.of(SigningSettings.KEY_ID_KEY, "a b")));
        assertTrue(e.problems().get(0).contains("'a b'"), e.problems().toString());
    }

    @Test
    void anUnreadableOrWrongKeyFileFailsAtStartNamingTheFile() throws IOException {
        JobConfig missing = config(Map.of(SigningSettings.KEY_FILE_KEY, dir.resolve("absent.pem").toString(),
                SigningSettings.KEY_ID_KEY, "k"));
        InvalidConfigException e = assertThrows(InvalidConfigException.class, () -> missing.signing().signer());
        assertTrue(e.problems().get(0).contains("absent.pem") && e.problems().get(0).contains("mount"),
                e.problems().toString());
        Path publicOnly = dir.resolve("public.pem");
        Files.writeString(publicOnly, Pem.write(Ed25519.generate("k", new SecureRandom()).verification()));
        JobConfig wrong = config(Map.of(SigningSettings.KEY_FILE_KEY, publicOnly.toString(),
                SigningSettings.KEY_ID_KEY, "k"));
        e = assertThrows(InvalidConfigException.class, () -> wrong.signing().signer());
        assertTrue(e.problems().get(0).contains("PRIVATE KEY"), e.problems().toString());
    }
}
