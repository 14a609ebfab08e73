package dev.runoff.cli;

import dev.runoff.records.Pem;
import dev.runoff.records.SignatureVerifier;
import dev.runoff.records.VerificationKey;
import java.io.IOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import picocli.CommandLine.Model.CommandSpec;
import picocli.CommandLine.ParameterException;

/** The {@code --public-key [ID=]PEM} values of a command, read into a {@link SignatureVerifier}. */
final class PublicKeyFiles {

    private static final String OPTION = "--public-key";

    private PublicKeyFiles() {
    }

    /**
     * The verifier of the keys in {@code values}, or null when there are none.
     *
     * @throws ParameterException naming the value when a file cannot be read or holds no Ed25519 public key
     */
    static SignatureVerifier read(CommandSpec spec, List<String> values) {
        if (values.isEmpty()) {
            return null;
        }
        List<VerificationKey> keys = new ArrayList<>(values.size());
        for (String value : values) {
            keys.add(one(spec, value));
        }
        try {
            return SignatureVerifier.of(keys);
        } catch (IllegalArgumentException e) {
            throw new ParameterException(spec.commandLine(), OPTION + ": " + e.getMessage(), e);
        }
    }

    private static VerificationKey one(CommandSpec spec, String value) {
        int eq = value.indexOf('=');
        String id = eq > 0 ? value.substring(0, eq) : null;
        Path file = Path.of(eq > 0 ? value.substring(eq + 1) : value);
        try {
            return Pem.readPublic(Files.readString(file, StandardCharsets.US_ASCII), file.toString(), id);
        } catch (IOException e) {
            throw new ParameterException(spec.commandLine(), OPTION + ": cannot read '" + file + "' ("
                    + e.getClass().getSimpleName() + ")", e);
        } catch (IllegalArgumentException e) {
            throw new ParameterException(spec.commandLine(), OPTION + ": " + e.getMessage(), e);
        }
    }
}
