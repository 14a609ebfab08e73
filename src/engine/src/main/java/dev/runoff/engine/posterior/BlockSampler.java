package dev.runoff.engine.posterior;

/**
 * A sampler that can also fill a block of draws in one call, so that an estimator making its draws a block
 * at a time pays one interface call per block rather than one per draw.
 */
public interface BlockSampler extends Posterior.Sampler {

    /**
     * Writes {@code n} draws to {@code out[0 .. n)}: the same values, in the same order, as {@code n} calls of
     * {@link #draw()} would give.
     */
    void fill(double[] out, int n);
}
