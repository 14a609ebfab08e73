package dev.runoff.engine.stats;

/**
 * Trials and successes of a Bernoulli metric (click per exposure, conversion per exposed unit).
 * The compact constructor does not validate so that a value read from a feed can be reported with its arm
 * name; call {@link #validate(String)} before use.
 *
 * @param trials    number of trials
 * @param successes number of successes, at most {@code trials}
 */
public record BernoulliStats(long trials, long successes) implements ArmStats {

    /** No trials, no successes. */
    public static final BernoulliStats EMPTY = new BernoulliStats(0, 0);

    /** Sum of two aggregates (associative, commutative). */
    public BernoulliStats merge(BernoulliStats other) {
        return new BernoulliStats(Math.addExact(trials, other.trials), Math.addExact(successes, other.successes));
    }

    /** Number of failures, {@code trials - successes}. */
    public long failures() {
        return trials - successes;
    }

    /** Observed rate, or NaN with no trials. */
    public double rate() {
        return trials == 0 ? Double.NaN : (double) successes / trials;
    }

    @Override
    public void validate(String arm) {
        if (trials < 0) {
            throw new IllegalArgumentException("arm '" + arm + "': trials must be >= 0, got " + trials);
        }
        if (successes < 0) {
            throw new IllegalArgumentException("arm '" + arm + "': successes must be >= 0, got " + successes);
        }
        if (successes > trials) {
            throw new IllegalArgumentException("arm '" + arm + "': successes (" + successes
                    + ") must not exceed trials (" + trials + ")");
        }
    }
}
