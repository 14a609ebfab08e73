package dev.runoff.records;

import java.security.GeneralSecurityException;
import java.security.Key;
import java.security.KeyPair;
import java.security.KeyPairGenerator;
import java.security.SecureRandom;

/**
 * Ed25519 key pairs from the JDK (JEP 339, Java 15 and later): no other cryptography library.
 */
public final class Ed25519 {

    /** The JDK's name of the algorithm, for {@code KeyPairGenerator}, {@code KeyFactory} and {@code Signature}. */
    static final String ALGORITHM = "Ed25519";

    private Ed25519() {
    }

    /**
     * A new key pair named {@code keyId}, drawn from {@code random}.
     *
     * @throws IllegalArgumentException when the id has not the form of a key id
     */
    public static Pair generate(String keyId, SecureRandom random) {
        KeyIds.check(keyId);
        try {
            KeyPairGenerator generator = KeyPairGenerator.getInstance(ALGORITHM);
            generator.initialize(255, random);
            KeyPair pair = generator.generateKeyPair();
            return new Pair(new SigningKey(keyId, pair.getPrivate()), new VerificationKey(keyId, pair.getPublic()));
        } catch (GeneralSecurityException e) {
            throw new IllegalStateException("this JDK cannot generate Ed25519 keys: " + e.getMessage(), e);
        }
    }

    static void checkAlgorithm(Key key, String what) {
        boolean ed25519 = key instanceof java.security.interfaces.EdECKey edec
                && ALGORITHM.equals(edec.getParams().getName());
        if (!ed25519) {
            throw new IllegalArgumentException(what + " must be an Ed25519 key, got " + key.getAlgorithm());
        }
    }

    /**
     * A key pair.
     *
     * @param signing      the private half
     * @param verification the public half
     */
    public record Pair(SigningKey signing, VerificationKey verification) {
    }
}
