package dev.runoff.job;

import dev.runoff.records.KeyIds;
import dev.runoff.records.Pem;
import dev.runoff.records.RecordSigner;
import java.io.IOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.Map;
import java.util.function.Consumer;

/**
 * How the job signs its decision and control records (see {@code src/docs/audit.md}, "Signatures").
 *
 * <p>The job refuses to start without a key unless {@value #REQUIRED_KEY}{@code =false} says that unsigned
 * records are wanted: a job that silently wrote unsigned records would make every verifier with a public key
 * fail, and a verifier without one could not tell. The key file is read when the job starts
 * ({@link #signer()}), not when the configuration loads, so that commands that only need the topics
 * ({@code topics create}) run without the secret.
 *
 * @param keyFile  PEM file of the Ed25519 private key (PKCS #8), or null ({@value #KEY_FILE_KEY})
 * @param keyId    the key's id, which verifiers look the public key up by ({@value #KEY_ID_KEY})
 * @param required whether the job refuses to start without a key ({@value #REQUIRED_KEY}, default true)
 */
public record SigningSettings(Path keyFile, String keyId, boolean required) {

    /** Key of {@link #keyFile()}. */
    public static final String KEY_FILE_KEY = "runoff.signing.key.file";
    /** Key of {@link #keyId()}. */
    public static final String KEY_ID_KEY = "runoff.signing.key.id";
    /** Key of {@link #required()}. */
    public static final String REQUIRED_KEY = "runoff.signing.required";
    /** Every key of this record. */
    public static final List<String> KEYS = List.of(KEY_FILE_KEY, KEY_ID_KEY, REQUIRED_KEY);

    /**
     * The settings in {@code values} (other keys are ignored). Each problem goes to {@code problems}; the
     * result is then {@code null}.
     */
    static SigningSettings from(Map<String, String> values, Consumer<String> problems) {
        String file = blankToNull(values.get(KEY_FILE_KEY));
        String id = blankToNull(values.get(KEY_ID_KEY));
        String required = blankToNull(values.get(REQUIRED_KEY));
        List<String> found = new ArrayList<>();
        if (required != null && !required.equals("true") && !required.equals("false")) {
            found.add(REQUIRED_KEY + " must be true or false, got '" + required + "'");
        }
        if (id != null && !KeyIds.valid(id)) {
            found.add(KEY_ID_KEY + " must be 1 to 64 of A-Z a-z 0-9 . _ -, got '" + id + "'");
        }
        if (file != null && id == null) {
            found.add(KEY_ID_KEY + " is required with " + KEY_FILE_KEY
                    + ": the id verifiers know the public key by, e.g. runoff-2026-12");
        }
        if (file == null && id != null) {
            found.add(KEY_FILE_KEY + " is required with " + KEY_ID_KEY
                    + ": the PEM file of the private key (e.g. a Kubernetes Secret mounted as a file)");
        }
        found.forEach(problems);
        return found.isEmpty()
                ? new SigningSettings(file == null ? null : Path.of(file), id, !"false".equals(required)) : null;
    }

    private static String blankToNull(String value) {
        return value == null || value.isBlank() ? null : value.trim();
    }

    /**
     * The signer: the key read from {@link #keyFile()}, or unsigned when no key is configured and
     * {@link #required()} is false.
     *
     * @throws InvalidConfigException naming the key and what to do when no key is configured but one is
     *                                required, or the file cannot be read or holds no Ed25519 private key
     */
    public RecordSigner signer() {
        if (keyFile == null) {
            if (required) {
                throw new InvalidConfigException(List.of(KEY_FILE_KEY + " is not set: the job signs every decision "
                        + "and control record with an Ed25519 key. Create one (openssl genpkey -algorithm ed25519 "
                        + "-out signing.pem), set " + KEY_FILE_KEY + " and " + KEY_ID_KEY + ", or set "
                        + REQUIRED_KEY + "=false to write unsigned records"));
            }
            return RecordSigner.unsigned();
        }
        String text;
        try {
            text = Files.readString(keyFile, StandardCharsets.US_ASCII);
        } catch (IOException | RuntimeException e) {
            throw new InvalidConfigException(List.of(KEY_FILE_KEY + ": cannot read '" + keyFile + "' ("
                    + e.getClass().getSimpleName() + "); mount the key's Secret there or fix the path"));
        }
        try {
            return RecordSigner.with(Pem.readPrivate(text, KEY_FILE_KEY + " '" + keyFile + "'", keyId));
        } catch (IllegalArgumentException e) {
            throw new InvalidConfigException(List.of(e.getMessage()));
        }
    }
}
