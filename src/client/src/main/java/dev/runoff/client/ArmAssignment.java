package dev.runoff.client;

import java.util.Objects;

/**
 * The arm one unit was served in one experiment, as {@link AllocationTable#assign} chose it, and whether that
 * arm was drawn for the experiment (so that its exposure and outcomes belong in the experiment's counts).
 * Hand it to {@link OutcomeReporter#exposure(ArmAssignment, String)} and, when the unit converts, to
 * {@link OutcomeReporter#outcome(ArmAssignment, String, dev.runoff.records.avro.EventType, Double)}: every
 * event then carries the arm the unit was served. Immutable.
 *
 * <p>It holds the raw unit key, in memory only (the reporter pseudonymises it before anything is sent);
 * {@link #toString()} leaves it out.
 */
public final class ArmAssignment {
    private final String experimentId;
    private final String unitKey;
    private final String arm;
    private final boolean drawn;

    ArmAssignment(String experimentId, String unitKey, String arm, boolean drawn) {
        this.experimentId = experimentId;
        this.unitKey = unitKey;
        this.arm = arm;
        this.drawn = drawn;
    }

    /**
     * An assignment made elsewhere (kept in a session, say) for reporting outcomes in a later request.
     *
     * @throws IllegalArgumentException when an argument is null or blank
     */
    public static ArmAssignment of(String experimentId, String unitKey, String arm) {
        return new ArmAssignment(Args.notBlank("experimentId", experimentId), Args.notBlank("unitKey", unitKey),
                Args.notBlank("arm", arm), true);
    }

    /** The experiment asked for (may be null when the caller passed null). */
    public String experimentId() {
        return experimentId;
    }

    /** The raw unit key asked for (may be null); never sent anywhere by this library. */
    public String unitKey() {
        return unitKey;
    }

    /** The arm to serve, never null. */
    public String arm() {
        return arm;
    }

    /**
     * True when the arm was drawn from the experiment's control record (running, stale with a
     * {@link StaleFallback#LAST_WEIGHTS} or {@link StaleFallback#UNIFORM} fallback, or stopped); false when
     * the policy's default arm was served instead (unknown experiment, missing unit key,
     * {@link StaleFallback#DEFAULT_ARM}). Only drawn arms are exposures of the experiment.
     */
    public boolean drawn() {
        return drawn;
    }

    @Override
    public boolean equals(Object other) {
        return other instanceof ArmAssignment that && drawn == that.drawn && arm.equals(that.arm)
                && Objects.equals(experimentId, that.experimentId) && Objects.equals(unitKey, that.unitKey);
    }

    @Override
    public int hashCode() {
        return Objects.hash(experimentId, unitKey, arm, drawn);
    }

    @Override
    public String toString() {
        return "ArmAssignment[experimentId=" + experimentId + ", arm=" + arm + ", drawn=" + drawn + "]";
    }
}
