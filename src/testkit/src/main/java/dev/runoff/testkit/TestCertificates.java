package dev.runoff.testkit;

import java.io.IOException;
import java.io.UncheckedIOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.concurrent.TimeUnit;

/**
 * A self-signed TLS certificate for a broker on 127.0.0.1, made at test time with the running JDK's
 * {@code keytool} (no key or certificate file is committed). The certificate names {@code IP:127.0.0.1} and
 * {@code DNS:localhost} as subject alternative names, so clients that check the host name (Kafka's default
 * {@code ssl.endpoint.identification.algorithm=https}) accept it.
 *
 * @param keyStore    PKCS12 key store holding the private key and the certificate
 * @param password    the key store's password (also the key's: PKCS12 keeps one)
 * @param certificate the certificate alone, PEM: what clients trust ({@code ssl.truststore.type=PEM})
 */
public record TestCertificates(Path keyStore, String password, Path certificate) {

    private static final String ALIAS = "broker";
    private static final long KEYTOOL_TIMEOUT_S = 60;

    /**
     * Generates a new key pair and certificate, valid for two days, into {@code dir} (created when missing):
     * {@code broker.p12} and {@code broker.pem}.
     *
     * @param password key store password, at least 6 characters (keytool's minimum)
     * @throws UncheckedIOException when keytool cannot run or fails; the message carries its output
     */
    public static TestCertificates generate(Path dir, String password) {
        if (password == null || password.length() < 6) {
            throw new IllegalArgumentException("key store password must have at least 6 characters (keytool)");
        }
        try {
            Files.createDirectories(dir);
            Path keyStore = dir.resolve("broker.p12");
            Path pem = dir.resolve("broker.pem");
            Files.deleteIfExists(keyStore);
            Files.deleteIfExists(pem);
            keytool("-genkeypair", "-alias", ALIAS, "-keyalg", "EC", "-groupname", "secp256r1",
                    "-dname", "CN=localhost", "-ext", "SAN=ip:127.0.0.1,dns:localhost", "-validity", "2",
                    "-storetype", "PKCS12", "-keystore", keyStore.toString(), "-storepass", password);
            keytool("-exportcert", "-rfc", "-alias", ALIAS, "-keystore", keyStore.toString(),
                    "-storepass", password, "-file", pem.toString());
            return new TestCertificates(keyStore, password, pem);
        } catch (IOException e) {
            throw new UncheckedIOException("could not generate a test certificate in " + dir, e);
        }
    }

    private static void keytool(String... args) throws IOException {
        List<String> command = new ArrayList<>();
        command.add(Path.of(System.getProperty("java.home"), "bin", "keytool").toString());
        command.addAll(List.of(args));
        Process p = new ProcessBuilder(command).redirectErrorStream(true).start();
        String output = new String(p.getInputStream().readAllBytes(), StandardCharsets.UTF_8).strip();
        try {
            if (!p.waitFor(KEYTOOL_TIMEOUT_S, TimeUnit.SECONDS)) {
                p.destroyForcibly();
                throw new IOException("keytool " + args[0] + " did not finish within " + KEYTOOL_TIMEOUT_S + " s");
            }
        } catch (InterruptedException e) {
            Thread.currentThread().interrupt();
            throw new IOException("interrupted while waiting for keytool " + args[0], e);
        }
        if (p.exitValue() != 0) {
            throw new IOException("keytool " + args[0] + " exited with " + p.exitValue() + ": " + output);
        }
    }
}
