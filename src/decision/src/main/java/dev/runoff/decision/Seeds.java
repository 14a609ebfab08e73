package dev.runoff.decision;

import dev.runoff.records.Sha256;
import java.nio.ByteBuffer;
import java.nio.charset.StandardCharsets;
import java.util.Objects;

/**
 * Seeds of the evaluations: the first 8 bytes, read as a big-endian long, of the SHA-256 (FIPS 180-4) of the
 * UTF-8 text {@code experimentId + ":" + sequence}. An auditor recomputes the seed of any decision from its
 * experiment id and sequence number alone.
 */
public final class Seeds {

    private Seeds() {
    }

    /**
     * The seed of decision {@code sequence} of experiment {@code experimentId}.
     *
     * @throws IllegalArgumentException when {@code sequence < 1}
     */
    public static long of(String experimentId, long sequence) {
        Objects.requireNonNull(experimentId, "experimentId");
        if (sequence < 1) {
            throw new IllegalArgumentException("sequence must be >= 1, got " + sequence);
        }
        byte[] text = (experimentId + ":" + sequence).getBytes(StandardCharsets.UTF_8);
        return ByteBuffer.wrap(Sha256.digest(text)).getLong();
    }
}
