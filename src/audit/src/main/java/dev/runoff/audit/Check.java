package dev.runoff.audit;

import dev.runoff.engine.core.Names;

/** The checks of {@code audit verify}, in the order their findings are listed for one record. */
public enum Check {
    /** The record decodes and obeys every rule of the records package. */
    RECORD,
    /** previousHash links to the record before it; the hash matches the record's content. */
    CHAIN,
    /** The record is signed by a trusted key and the signature matches (only with public keys given). */
    SIGNATURE,
    /** Sequence numbers run 1, 2, 3, ... without gaps, repeats or reordering. */
    SEQUENCE,
    /** The engine, fed the record's statistics, configuration and seed, reproduces it bit for bit. */
    RECOMPUTATION,
    /** The decision, winner, reason, statistic and threshold follow the stopping rule in the record. */
    STOPPING,
    /**
     * A Monte Carlo probability of being best lies more than the allowed number of its standard errors from
     * exact integration (only with {@code --cross-check}; the recorded decision is not changed).
     */
    CROSS_CHECK,
    /** The exposures between two records follow the weights published by the first. */
    SAMPLE_RATIO;

    /** Lowercase name with dashes, as printed: {@code sample-ratio}. */
    public String label() {
        return Names.kebab(this);
    }
}
