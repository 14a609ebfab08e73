package dev.runoff.client;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNotEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.List;
import java.util.SplittableRandom;
import org.apache.commons.rng.core.source64.SplitMix64;
import org.junit.jupiter.api.Test;

/** The pick hash against independent SplitMix64 implementations, its spread, and its pinned values. */
class UnitHashTest {

    private static final List<String> SAMPLES = List.of("", "a", "ab", "abc", "abcd", "abcde", "user-12345678",
            "caf\u00e9", "\ud83d\ude00 emoji", "u\0", "a much longer unit key of forty-one chars");

    private static final long PINNED_EMPTY = 0x48218226FF3CD4BFL;
    private static final long PINNED_USER = 0xEB800ECBE30D4E77L;
    private static final long PINNED_SALTED = 0xCEF473E1A2AA4C1DL;

    @Test
    void mixMatchesSplittableRandom() {
        // java.util.SplittableRandom (JDK): new SplittableRandom(s).nextLong() = mix64(s + GOLDEN_GAMMA),
        // with the same Stafford "Mix13" finaliser
        for (long seed : new long[] {0, 1, -1, 42, Long.MIN_VALUE, 0x0123456789ABCDEFL}) {
            assertEquals(new SplittableRandom(seed).nextLong(), UnitHash.mix64(seed + UnitHash.GOLDEN_GAMMA));
        }
    }

    @Test
    void uniformSourceReplaysCommonsRngSplitMix64() {
        // Apache Commons RNG's SplitMix64 is an independent implementation of the same generator;
        // its nextDouble is (next >>> 11) * 2^-53, as is ours
        SplitMix64 reference = new SplitMix64(20231114L);
        SplitMixUniform ours = SplitMixUniform.seeded(20231114L);
        for (int i = 0; i < 1_000; i++) {
            assertEquals(reference.nextDouble(), ours.getAsDouble());
        }
    }

    @Test
    void hashFollowsTheDocumentedAlgorithm() {
        for (String text : SAMPLES) {
            for (long seed : new long[] {0, 7, CompiledAllocation.EXPERIMENT_SEED}) {
                assertEquals(restated(seed, text), UnitHash.hash64(seed, text), text);
            }
        }
    }

    /** The class comment's pseudo-code, written with SplittableRandom as the mixing function. */
    private static long restated(long seed, String text) {
        long h = jdkMix(seed + (text.length() + 1L) * UnitHash.GOLDEN_GAMMA);
        for (int start = 0; start < text.length(); start += 4) {
            long block = 0;
            for (int j = 0; j < 4 && start + j < text.length(); j++) {
                block |= (long) text.charAt(start + j) << (16 * j);
            }
            h = jdkMix(h ^ block) + UnitHash.GOLDEN_GAMMA;
        }
        return jdkMix(h);
    }

    private static long jdkMix(long z) {
        return new SplittableRandom(z - UnitHash.GOLDEN_GAMMA).nextLong();
    }

    @Test
    void pinnedValuesNeverChange() {
        // Values produced by this implementation when the hash was introduced. Deterministic picks of every
        // replica and every release depend on them: if this test fails, every unit would change arm.
        assertEquals(PINNED_EMPTY, UnitHash.hash64(0, ""));
        assertEquals(PINNED_USER, UnitHash.hash64(0, "user-12345678"));
        assertEquals(PINNED_SALTED, UnitHash.hash64(CompiledAllocation.EXPERIMENT_SEED, "checkout-button"));
    }

    @Test
    void similarKeysSpreadUniformly() {
        long[] bins = new long[64];
        int n = 128_000;
        for (int i = 0; i < n; i++) {
            double u = UnitHash.toUnitInterval(UnitHash.hash64(0, "user-" + i));
            bins[(int) (u * bins.length)]++;
        }
        double[] expected = new double[bins.length];
        java.util.Arrays.fill(expected, 1.0);
        double p = ArmCounts.pValue(expected, bins);
        assertTrue(p > ArmCounts.ALPHA, "chi-square p = " + p);
    }

    @Test
    void trailingNulCharsAndLengthsAreDistinguished() {
        assertNotEquals(UnitHash.hash64(0, "u"), UnitHash.hash64(0, "u\0"));
        assertNotEquals(UnitHash.hash64(0, ""), UnitHash.hash64(0, "\0"));
        assertNotEquals(UnitHash.hash64(0, "abcd"), UnitHash.hash64(0, "abcd\0\0\0\0"));
    }

    @Test
    void unitIntervalStaysBelowOne() {
        assertEquals(0.0, UnitHash.toUnitInterval(0L));
        assertTrue(UnitHash.toUnitInterval(-1L) < 1.0);
        assertEquals(1.0 - 0x1.0p-53, UnitHash.toUnitInterval(-1L));
    }
}
