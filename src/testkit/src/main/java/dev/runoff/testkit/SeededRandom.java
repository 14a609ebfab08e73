package dev.runoff.testkit;

import java.security.NoSuchAlgorithmException;
import java.security.SecureRandom;

/** Deterministic randomness for tests that make keys, so that keys and signatures are the same on every run. */
public final class SeededRandom {

    private SeededRandom() {
    }

    /**
     * A {@code SHA1PRNG} generator seeded before its first use, which makes its output a function of
     * {@code seed} alone (behaviour of that algorithm in the JDK's SUN provider, from memory). For tests only:
     * real keys come from the platform's default, self-seeded generator.
     */
    public static SecureRandom secure(long seed) {
        try {
            SecureRandom random = SecureRandom.getInstance("SHA1PRNG");
            random.setSeed(seed);
            return random;
        } catch (NoSuchAlgorithmException e) {
            throw new IllegalStateException("the JDK's SUN provider has no SHA1PRNG", e);
        }
    }
}
