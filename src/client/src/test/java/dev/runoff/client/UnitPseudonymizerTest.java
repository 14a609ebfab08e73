package dev.runoff.client;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertNotEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.Arrays;
import java.util.List;
import java.util.concurrent.ExecutorService;
import java.util.concurrent.Executors;
import java.util.concurrent.Future;
import org.junit.jupiter.api.Test;

/** The keyed hash of unit ids against the HMAC-SHA-256 test vectors of RFC 4231. */
class UnitPseudonymizerTest {

    /** RFC 4231 test cases 6 and 7 use this key: 131 bytes of 0xaa. */
    private static byte[] rfc4231LongKey() {
        byte[] key = new byte[131];
        Arrays.fill(key, (byte) 0xaa);
        return key;
    }

    @Test
    void matchesRfc4231TestCase6TruncatedTo128Bits() {
        // RFC 4231 section 4.7 (test case 6), HMAC-SHA-256 =
        // 60e431591ee0b67f0d8a26aacbf5b77f 8e0bc6213728c5140546040f0ee37f54 (from memory); RFC 2104
        // section 5 truncation keeps the leftmost 128 bits
        UnitPseudonymizer hasher = UnitPseudonymizer.withKey(rfc4231LongKey());
        assertEquals("60e431591ee0b67f0d8a26aacbf5b77f",
                hasher.pseudonym("Test Using Larger Than Block-Size Key - Hash Key First"));
    }

    @Test
    void matchesRfc4231TestCase7TruncatedTo128Bits() {
        // RFC 4231 section 4.8 (test case 7), HMAC-SHA-256 =
        // 9b09ffa71b942fcb27635fbcd5b0e944 bfdc63644f0713938a7f51535c3a35e2 (from memory)
        UnitPseudonymizer hasher = UnitPseudonymizer.withKey(rfc4231LongKey());
        assertEquals("9b09ffa71b942fcb27635fbcd5b0e944", hasher.pseudonym("This is a test using a larger than "
                + "block-size key and a larger than block-size data. The key needs to be hashed before being "
                + "used by the HMAC algorithm."));
    }

    @Test
    void differentKeysGiveUnrelatedPseudonyms() {
        byte[] key = new byte[32];
        byte[] other = new byte[32];
        other[31] = 1;
        String a = UnitPseudonymizer.withKey(key).pseudonym("alice@example.com");
        String b = UnitPseudonymizer.withKey(other).pseudonym("alice@example.com");
        assertNotEquals(a, b);
        assertTrue(a.matches("[0-9a-f]{32}"), a);
        assertFalse(a.contains("alice"));
    }

    @Test
    void keyIsCopiedSoLaterChangesDoNotMatter() {
        byte[] key = new byte[32];
        UnitPseudonymizer hasher = UnitPseudonymizer.withKey(key);
        String before = hasher.pseudonym("u1");
        key[0] = 9;
        assertEquals(before, hasher.pseudonym("u1"));
    }

    @Test
    void shortKeyAndEmptyIdAreRejected() {
        IllegalArgumentException shortKey = assertThrows(IllegalArgumentException.class,
                () -> UnitPseudonymizer.withKey(new byte[31]));
        assertTrue(shortKey.getMessage().contains("key") && shortKey.getMessage().contains("31"), shortKey.getMessage());
        UnitPseudonymizer hasher = UnitPseudonymizer.withKey(new byte[32]);
        assertThrows(IllegalArgumentException.class, () -> hasher.pseudonym(""));
        assertThrows(IllegalArgumentException.class, () -> hasher.pseudonym(null));
    }

    @Test
    void concurrentUseGivesTheSameAnswers() throws Exception {
        UnitPseudonymizer hasher = UnitPseudonymizer.withKey(rfc4231LongKey());
        String expected = hasher.pseudonym("user-1");
        ExecutorService pool = Executors.newFixedThreadPool(4);
        try {
            List<Future<Boolean>> results = pool.invokeAll(java.util.Collections.nCopies(8, () -> {
                for (int i = 0; i < 5_000; i++) {
                    if (!expected.equals(hasher.pseudonym("user-1"))) {
                        return false;
                    }
                }
                return true;
            }));
            for (Future<Boolean> result : results) {
                assertTrue(result.get());
            }
        } finally {
            pool.shutdownNow();
        }
    }
}
