package dev.runoff.records;

import java.security.GeneralSecurityException;
import java.security.KeyFactory;
import java.security.spec.PKCS8EncodedKeySpec;
import java.security.spec.X509EncodedKeySpec;
import java.util.Base64;
import java.util.regex.Matcher;
import java.util.regex.Pattern;

/**
 * PEM text of Ed25519 keys (RFC 7468, Josefsson and Leonard 2015): {@code PUBLIC KEY} holds the X.509
 * SubjectPublicKeyInfo, {@code PRIVATE KEY} the PKCS #8 PrivateKeyInfo, base64 in lines of 64 characters.
 * The key id goes on a line {@code Key-Id: ID} before the {@code -----BEGIN} line: RFC 7468 section 2 lets
 * text precede the encapsulation boundary and parsers skip it, so {@code openssl pkey -pubin} still reads
 * the file. A key id given by the caller wins over the line; a file without the line needs one.
 */
public final class Pem {

    /** Label of a public key. */
    public static final String PUBLIC = "PUBLIC KEY";
    /** Label of a private key. */
    public static final String PRIVATE = "PRIVATE KEY";

    private static final Pattern KEY_ID_LINE = Pattern.compile("(?m)^Key-Id:[ \\t]*(\\S+)[ \\t]*$");

    private Pem() {
    }

    /** The PEM text of {@code key}, with its key id line. */
    public static String write(VerificationKey key) {
        return text(key.keyId(), PUBLIC, key.publicKey().getEncoded());
    }

    /** The PEM text of {@code key}, with its key id line. */
    public static String write(SigningKey key) {
        return text(key.keyId(), PRIVATE, key.privateKey().getEncoded());
    }

    /**
     * The public key in {@code text}; its id is {@code keyId} when given, else the file's {@code Key-Id} line.
     *
     * @param source where the text came from, for messages
     * @throws IllegalArgumentException naming {@code source} and what is wrong
     */
    public static VerificationKey readPublic(String text, String source, String keyId) {
        String id = keyId != null ? KeyIds.check(keyId) : keyId(text, source);
        byte[] der = body(text, PUBLIC, source);
        try {
            return new VerificationKey(id,
                    KeyFactory.getInstance(Ed25519.ALGORITHM).generatePublic(new X509EncodedKeySpec(der)));
        } catch (GeneralSecurityException e) {
            throw new IllegalArgumentException(source + ": not an Ed25519 public key (" + e.getMessage() + ")", e);
        }
    }

    /**
     * The private key in {@code text}; its id is {@code keyId} when given, else the file's {@code Key-Id} line.
     *
     * @param source where the text came from, for messages
     * @throws IllegalArgumentException naming {@code source} and what is wrong
     */
    public static SigningKey readPrivate(String text, String source, String keyId) {
        String id = keyId != null ? KeyIds.check(keyId) : keyId(text, source);
        byte[] der = body(text, PRIVATE, source);
        try {
            return new SigningKey(id,
                    KeyFactory.getInstance(Ed25519.ALGORITHM).generatePrivate(new PKCS8EncodedKeySpec(der)));
        } catch (GeneralSecurityException e) {
            throw new IllegalArgumentException(source + ": not an Ed25519 private key in PKCS #8 ("
                    + e.getMessage() + "); make one with: openssl genpkey -algorithm ed25519", e);
        }
    }

    private static String keyId(String text, String source) {
        Matcher m = KEY_ID_LINE.matcher(text);
        if (m.find()) {
            if (!KeyIds.valid(m.group(1))) {
                throw new IllegalArgumentException(source + ": " + KeyIds.describe(m.group(1)));
            }
            return m.group(1);
        }
        throw new IllegalArgumentException(source + ": no 'Key-Id: ID' line before -----BEGIN; add one or "
                + "give the id with the key (ID=FILE)");
    }

    private static byte[] body(String text, String label, String source) {
        String begin = "-----BEGIN " + label + "-----";
        String end = "-----END " + label + "-----";
        int from = text.indexOf(begin);
        int to = from < 0 ? -1 : text.indexOf(end, from);
        if (from < 0 || to < 0) {
            throw new IllegalArgumentException(source + ": no " + begin + " ... " + end + " block");
        }
        String base64 = text.substring(from + begin.length(), to).replaceAll("\\s", "");
        try {
            return Base64.getDecoder().decode(base64);
        } catch (IllegalArgumentException e) {
            throw new IllegalArgumentException(source + ": the " + label + " block is not base64 ("
                    + e.getMessage() + ")", e);
        }
    }

    private static String text(String keyId, String label, byte[] der) {
        return "Key-Id: " + keyId + "\n-----BEGIN " + label + "-----\n"
                + Base64.getMimeEncoder(64, new byte[] {'\n'}).encodeToString(der)
                + "\n-----END " + label + "-----\n";
    }
}
