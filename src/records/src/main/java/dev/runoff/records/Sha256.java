package dev.runoff.records;

import java.security.MessageDigest;
import java.security.NoSuchAlgorithmException;

/**
 * SHA-256 (FIPS 180-4) with one digest object per thread, so that hashing a record or a seed does not look the
 * algorithm up in the security providers each time.
 */
public final class Sha256 {

    private static final ThreadLocal<MessageDigest> DIGEST = ThreadLocal.withInitial(Sha256::newDigest);

    private Sha256() {
    }

    /** The 32-byte SHA-256 digest of {@code data}. */
    public static byte[] digest(byte[] data) {
        return DIGEST.get().digest(data);
    }

    private static MessageDigest newDigest() {
        try {
            return MessageDigest.getInstance("SHA-256");
        } catch (NoSuchAlgorithmException e) {
            throw new IllegalStateException("every Java platform must provide SHA-256", e);
        }
    }
}
