package dev.runoff.client;

/**
 * The fast, non-cryptographic 64-bit hash behind deterministic picks. Not secret and not collision
 * resistant against an adversary: it only has to spread unit keys evenly and give the same value on every
 * JVM, every replica and every release, so that a unit keeps its arm. Changing it reassigns every unit.
 *
 * <p>Design: the mixing function is the SplitMix64 finaliser (Steele, Lea and Flood 2014, "Fast Splittable
 * Pseudorandom Number Generators", OOPSLA; the constants are Stafford's "Mix13" variant, the ones
 * {@code java.util.SplittableRandom} uses). {@link #hash64(long, CharSequence)} reads the string as UTF-16
 * code units (no encoding step, so no allocation), four per 64-bit block, little-end first:
 * <pre>
 *   h = mix64(seed + (length + 1) * GOLDEN_GAMMA)
 *   for each full block b of four chars:  h = mix64(h ^ b) + GOLDEN_GAMMA
 *   last block (1 to 3 chars, zero-padded), if any: h = mix64(h ^ b) + GOLDEN_GAMMA
 *   result = mix64(h)
 * </pre>
 * where {@code GOLDEN_GAMMA = 0x9E3779B97F4A7C15} and every addition and product wraps. The length enters
 * first, so strings that differ only by trailing {@code '\0'} chars hash differently; the {@code + 1} keeps
 * the empty string under seed 0 away from mix64's fixed point 0.
 */
public final class UnitHash {

    /** 2^64 divided by the golden ratio, rounded to odd: the SplitMix64 increment. */
    public static final long GOLDEN_GAMMA = 0x9E3779B97F4A7C15L;

    private static final double UNIT_53 = 0x1.0p-53;

    private UnitHash() {
    }

    /** SplitMix64's finaliser: a bijection on 64-bit values with good avalanche. */
    public static long mix64(long z) {
        z = (z ^ (z >>> 30)) * 0xBF58476D1CE4E5B9L;
        z = (z ^ (z >>> 27)) * 0x94D049BB133111EBL;
        return z ^ (z >>> 31);
    }

    /**
     * Hash of {@code text}'s UTF-16 chars under {@code seed} (see the class comment). Allocates nothing.
     *
     * @throws NullPointerException when {@code text} is null
     */
    public static long hash64(long seed, CharSequence text) {
        int length = text.length();
        long h = mix64(seed + (length + 1L) * GOLDEN_GAMMA);
        int i = 0;
        for (; i + 4 <= length; i += 4) {
            long block = text.charAt(i)
                    | (long) text.charAt(i + 1) << 16
                    | (long) text.charAt(i + 2) << 32
                    | (long) text.charAt(i + 3) << 48;
            h = mix64(h ^ block) + GOLDEN_GAMMA;
        }
        if (i < length) {
            long block = 0;
            for (int shift = 0; i < length; i++, shift += 16) {
                block |= (long) text.charAt(i) << shift;
            }
            h = mix64(h ^ block) + GOLDEN_GAMMA;
        }
        return mix64(h);
    }

    /**
     * Maps a 64-bit hash to a double in [0, 1) from its top 53 bits, so every representable value is
     * equally likely (common practice, the same mapping as {@code SplittableRandom.nextDouble()}).
     */
    public static double toUnitInterval(long hash) {
        return (hash >>> 11) * UNIT_53;
    }
}
