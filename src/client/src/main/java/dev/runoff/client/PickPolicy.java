package dev.runoff.client;

import java.util.Objects;
import java.util.function.DoubleSupplier;

/**
 * How an {@link AllocationTable} answers {@link AllocationTable#pick}: the assignment mode, the default arm,
 * and what to do for stale and stopped experiments. Immutable.
 *
 * <p>Defaults: {@link Assignment#HASHED}, {@link StaleFallback#UNIFORM} (the control record's own rule is
 * that weights past {@code validUntil} must no longer be used), {@link StoppedPick#RECORD_WEIGHTS}.
 */
public final class PickPolicy {

    private final String defaultArm;
    private final Assignment assignment;
    private final DoubleSupplier uniformSource;
    private final StaleFallback staleFallback;
    private final StoppedPick afterStop;

    private PickPolicy(Builder builder) {
        this.defaultArm = builder.defaultArm;
        this.assignment = builder.assignment;
        this.uniformSource = builder.uniformSource;
        this.staleFallback = builder.staleFallback;
        this.afterStop = builder.afterStop;
    }

    /**
     * Starts a policy.
     *
     * @param defaultArm arm returned for experiments the table does not hold (never seen, or ended by a
     *                   tombstone), for a null unit key, and for stale experiments under
     *                   {@link StaleFallback#DEFAULT_ARM}; it need not be an arm of any experiment
     * @throws IllegalArgumentException when {@code defaultArm} is null or blank
     */
    public static Builder builder(String defaultArm) {
        return new Builder(Args.notBlank("defaultArm", defaultArm));
    }

    /** The arm for unknown experiments, null unit keys and the {@link StaleFallback#DEFAULT_ARM} fallback. */
    public String defaultArm() {
        return defaultArm;
    }

    /** The assignment mode. */
    public Assignment assignment() {
        return assignment;
    }

    /** The uniform source of {@link Assignment#RANDOM} picks; null under {@link Assignment#HASHED}. */
    public DoubleSupplier uniformSource() {
        return uniformSource;
    }

    /** The fallback for stale running experiments. */
    public StaleFallback staleFallback() {
        return staleFallback;
    }

    /** The behaviour after STOP. */
    public StoppedPick afterStop() {
        return afterStop;
    }

    @Override
    public String toString() {
        return "PickPolicy[defaultArm=" + defaultArm + ", assignment=" + assignment + ", staleFallback="
                + staleFallback + ", afterStop=" + afterStop + "]";
    }

    /** Describes a {@link PickPolicy}. */
    public static final class Builder {
        private final String defaultArm;
        private Assignment assignment = Assignment.HASHED;
        private DoubleSupplier uniformSource;
        private StaleFallback staleFallback = StaleFallback.UNIFORM;
        private StoppedPick afterStop = StoppedPick.RECORD_WEIGHTS;

        private Builder(String defaultArm) {
            this.defaultArm = defaultArm;
        }

        /** Deterministic picks from a hash of (experiment, unit key, weights); the default. */
        public Builder hashed() {
            this.assignment = Assignment.HASHED;
            this.uniformSource = null;
            return this;
        }

        /**
         * A fresh draw per call.
         *
         * @param source thread-safe source of doubles in [0, 1), called once per pick of a known experiment
         *               (for example {@link SplitMixUniform#seeded(long)})
         */
        public Builder random(DoubleSupplier source) {
            this.uniformSource = Objects.requireNonNull(source, "source");
            this.assignment = Assignment.RANDOM;
            return this;
        }

        /** Sets the fallback for stale running experiments. */
        public Builder staleFallback(StaleFallback fallback) {
            this.staleFallback = Objects.requireNonNull(fallback, "staleFallback");
            return this;
        }

        /** Sets the behaviour after STOP. */
        public Builder afterStop(StoppedPick policy) {
            this.afterStop = Objects.requireNonNull(policy, "afterStop");
            return this;
        }

        /** Builds the policy. */
        public PickPolicy build() {
            return new PickPolicy(this);
        }
    }
}
