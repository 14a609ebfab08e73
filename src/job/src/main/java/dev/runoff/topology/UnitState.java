package dev.runoff.topology;


/**
 * What attribution keeps per (experiment, unit).
 *
 * @param arm          the arm of the unit's first trial event (kept for good)
 * @param firstTrialAt timestamp of its first trial event
 * @param lastTrialAt  timestamp of its latest trial event (the attribution window is measured from it)
 * @param trials       its trial events counted
 * @param successes    its successes counted, never above {@code trials}
 * @param windowMs     the experiment's attribution window at the last update
 * @param touchedAt    wall-clock time of the last update, for the clean-up
 */
record UnitState(String arm, long firstTrialAt, long lastTrialAt, long trials, long successes, long windowMs,
                 long touchedAt) {

    /** Serde of the units store. */
    static final InternalSerde<UnitState> SERDE = new InternalSerde<>(UnitState::encode, UnitState::decode);

    static UnitState first(String arm, long timestamp, long windowMs, long now) {
        return new UnitState(arm, timestamp, timestamp, 1, 0, windowMs, now);
    }

    UnitState trial(long timestamp, long window, long now) {
        return new UnitState(arm, firstTrialAt, Math.max(lastTrialAt, timestamp), trials + 1, successes, window, now);
    }

    UnitState success(long now) {
        return new UnitState(arm, firstTrialAt, lastTrialAt, trials, successes + 1, windowMs, now);
    }

    /** Whether the clean-up may drop this entry at {@code now}. */
    boolean expired(long now, long marginMs) {
        long idle = now - touchedAt;
        return idle > windowMs && idle - windowMs > marginMs;
    }

    private static byte[] encode(UnitState u) {
        return new BinaryOut().writeString(u.arm).writeLong(u.firstTrialAt).writeLong(u.lastTrialAt)
                .writeLong(u.trials).writeLong(u.successes).writeLong(u.windowMs).writeLong(u.touchedAt).toByteArray();
    }

    private static UnitState decode(byte[] bytes) {
        BinaryIn in = new BinaryIn(bytes);
        UnitState state = new UnitState(in.readString(), in.readLong(), in.readLong(), in.readLong(), in.readLong(),
                in.readLong(), in.readLong());
        in.end();
        return state;
    }
}
