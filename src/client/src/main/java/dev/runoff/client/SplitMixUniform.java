package dev.runoff.client;

import java.util.concurrent.atomic.AtomicLong;
import java.util.function.DoubleSupplier;

/**
 * A seeded, thread-safe source of uniform doubles in [0, 1) for {@link Assignment#RANDOM} picks: the
 * SplitMix64 generator (Steele, Lea and Flood 2014) with its state in one {@link AtomicLong}, so each call is
 * one atomic add plus {@link UnitHash#mix64}, without locks or allocation.
 *
 * <p>From one thread the sequence is that of SplitMix64 started at {@code seed} (the same as Apache Commons
 * RNG's {@code SplitMix64}); with several threads each value is still drawn exactly once, but which thread
 * gets which value depends on scheduling.
 */
public final class SplitMixUniform implements DoubleSupplier {

    private final AtomicLong state;

    private SplitMixUniform(long seed) {
        this.state = new AtomicLong(seed);
    }

    /** A generator started at {@code seed}. */
    public static SplitMixUniform seeded(long seed) {
        return new SplitMixUniform(seed);
    }

    /** The next raw 64-bit output. */
    public long nextLong() {
        return UnitHash.mix64(state.addAndGet(UnitHash.GOLDEN_GAMMA));
    }

    /** The next double in [0, 1), from the top 53 bits of {@link #nextLong()}. */
    @Override
    public double getAsDouble() {
        return UnitHash.toUnitInterval(nextLong());
    }
}
