package dev.runoff.client;

import java.nio.charset.StandardCharsets;
import java.security.InvalidKeyException;
import java.security.NoSuchAlgorithmException;
import java.util.Arrays;
import java.util.HexFormat;
import java.util.Objects;
import javax.crypto.Mac;
import javax.crypto.spec.SecretKeySpec;

/**
 * Replaces a unit id (user id, device id, e-mail...) with a keyed hash before it leaves the process, so that
 * outcome events carry no personal identifier: HMAC-SHA-256 (RFC 2104; the JDK's {@code HmacSHA256}) of the
 * id's UTF-8 bytes under a secret key, truncated to its first 128 bits (RFC 2104 section 5 allows
 * truncation to no less than half the hash length) and written as 32 lowercase hex characters.
 *
 * <p>The same key must be used by every process that reports events of an experiment (exposures and the
 * clicks, conversions and values attributed to them), or the job cannot match them. Keep the key secret
 * and out of the topics: without it the pseudonyms cannot be linked back to ids by trying likely ids, with
 * it they can. Rotating the key makes every unit look new to the job. Note that pseudonymised data is still
 * personal data under most privacy laws (for example GDPR recital 26); hashing reduces exposure, it does
 * not anonymise.
 *
 * <p>Thread-safe (one {@link Mac} per thread).
 */
public final class UnitPseudonymizer {
    /** Shortest accepted key: the hash length, below which RFC 2104 (section 3) discourages keys. */
    public static final int MIN_KEY_BYTES = 32;

    private static final String ALGORITHM = "HmacSHA256";
    private static final int OUTPUT_BYTES = 16;

    private final SecretKeySpec key;
    private final ThreadLocal<Mac> macs;

    private UnitPseudonymizer(byte[] key) {
        this.key = new SecretKeySpec(key, ALGORITHM);
        this.macs = ThreadLocal.withInitial(this::newMac);
        newMac();
    }

    /**
     * A pseudonymiser with {@code key} (copied).
     *
     * @throws IllegalArgumentException when the key is shorter than {@value #MIN_KEY_BYTES} bytes
     */
    public static UnitPseudonymizer withKey(byte[] key) {
        Objects.requireNonNull(key, "key");
        if (key.length < MIN_KEY_BYTES) {
            throw new IllegalArgumentException("key must have at least " + MIN_KEY_BYTES + " bytes, got "
                    + key.length);
        }
        return new UnitPseudonymizer(Arrays.copyOf(key, key.length));
    }

    /**
     * The pseudonym of {@code unitId}: 32 lowercase hex characters.
     *
     * @throws IllegalArgumentException when {@code unitId} is null or empty
     */
    public String pseudonym(String unitId) {
        if (unitId == null || unitId.isEmpty()) {
            throw new IllegalArgumentException("unitId must not be empty, got "
                    + (unitId == null ? "null" : "''"));
        }
        byte[] digest = macs.get().doFinal(unitId.getBytes(StandardCharsets.UTF_8));
        return HexFormat.of().formatHex(digest, 0, OUTPUT_BYTES);
    }

    private Mac newMac() {
        try {
            Mac mac = Mac.getInstance(ALGORITHM);
            mac.init(key);
            return mac;
        } catch (NoSuchAlgorithmException | InvalidKeyException e) {
            throw new IllegalStateException("the JDK must provide " + ALGORITHM, e);
        }
    }

    @Override
    public String toString() {
        return "UnitPseudonymizer[" + ALGORITHM + ", key hidden]";
    }
}
