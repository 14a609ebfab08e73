package dev.runoff.records;

import java.security.GeneralSecurityException;
import java.security.PrivateKey;
import java.security.Signature;
import java.util.Objects;

/**
 * An Ed25519 private key and the id verifiers know its public key by. Signing is deterministic (RFC 8032,
 * Josefsson and Liusvaara 2017, section 5.1.6): the same key and message give the same signature.
 *
 * @param keyId      the key's id, see {@link KeyIds}
 * @param privateKey the Ed25519 private key
 */
public record SigningKey(String keyId, PrivateKey privateKey) {

    /**
     * Checks the id and that the key is an Ed25519 key.
     *
     * @throws IllegalArgumentException naming what is wrong
     */
    public SigningKey {
        KeyIds.check(keyId);
        Objects.requireNonNull(privateKey, "privateKey");
        Ed25519.checkAlgorithm(privateKey, "signing key '" + keyId + "'");
    }

    /** The Ed25519 signature of {@code message}, 64 bytes. */
    public byte[] sign(byte[] message) {
        try {
            Signature signer = Signature.getInstance(Ed25519.ALGORITHM);
            signer.initSign(privateKey);
            signer.update(message);
            return signer.sign();
        } catch (GeneralSecurityException e) {
            throw new IllegalStateException("signing with key '" + keyId + "' failed: " + e.getMessage(), e);
        }
    }

    @Override
    public String toString() {
        return "SigningKey[" + keyId + "]";
    }
}
