package dev.runoff.records;

import java.security.GeneralSecurityException;
import java.security.PublicKey;
import java.security.Signature;
import java.util.Objects;

/**
 * An Ed25519 public key and its id.
 *
 * @param keyId     the key's id, see {@link KeyIds}
 * @param publicKey the Ed25519 public key
 */
public record VerificationKey(String keyId, PublicKey publicKey) {

    /**
     * Checks the id and that the key is an Ed25519 key.
     *
     * @throws IllegalArgumentException naming what is wrong
     */
    public VerificationKey {
        KeyIds.check(keyId);
        Objects.requireNonNull(publicKey, "publicKey");
        Ed25519.checkAlgorithm(publicKey, "public key '" + keyId + "'");
    }

    /** True when {@code signature} is this key's Ed25519 signature of {@code message}. */
    public boolean verifies(byte[] message, byte[] signature) {
        try {
            Signature verifier = Signature.getInstance(Ed25519.ALGORITHM);
            verifier.initVerify(publicKey);
            verifier.update(message);
            return verifier.verify(signature);
        } catch (java.security.SignatureException e) {
            return false;
        } catch (GeneralSecurityException e) {
            throw new IllegalStateException("verifying with key '" + keyId + "' failed: " + e.getMessage(), e);
        }
    }
}
