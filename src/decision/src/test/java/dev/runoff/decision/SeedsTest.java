package dev.runoff.decision;


import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNotEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;

import dev.runoff.records.HashChain;
import java.nio.charset.StandardCharsets;
import org.junit.jupiter.api.Test;

class SeedsTest {

    @Test
    void seedIsTheFirstEightBytesOfTheSha256OfIdColonSequence() {
        // HashChain.sha256Hex is checked against the FIPS 180-2 example vectors in the records tests.
        String hex = HashChain.sha256Hex("checkout:42".getBytes(StandardCharsets.UTF_8));
        assertEquals(Long.parseUnsignedLong(hex.substring(0, 16), 16), Seeds.of("checkout", 42));
    }

    @Test
    void seedsDifferBySequenceAndExperiment() {
        assertNotEquals(Seeds.of("e", 1), Seeds.of("e", 2));
        assertNotEquals(Seeds.of("e", 1), Seeds.of("f", 1));
    }

    @Test
    void sequenceBelowOneIsRejected() {
        assertEquals("sequence must be >= 1, got 0",
                assertThrows(IllegalArgumentException.class, () -> Seeds.of("e", 0)).getMessage());
    }
}
