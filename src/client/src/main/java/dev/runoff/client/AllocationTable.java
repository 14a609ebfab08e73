package dev.runoff.client;

import dev.runoff.records.Decoded;
import dev.runoff.records.RecordCodec;
import dev.runoff.records.SignatureVerifier;
import dev.runoff.records.avro.AllocationUpdate;
import java.time.Clock;
import java.util.HashMap;
import java.util.Objects;
import java.util.Optional;
import java.util.Set;
import java.util.function.DoubleSupplier;
import java.util.function.Function;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;

/**
 * The latest control record of every experiment, held in memory, and the arm picks made from it.
 *
 * <p>Reading: {@link #pick} never throws for any experiment id or unit key and allocates nothing. It reads
 * one immutable snapshot (a map from experiment id to the compiled record: arm names, weights, hash seeds)
 * through a volatile field, so any number of request threads can call it without locks. {@link #assign}
 * makes the same choice and returns it with what {@link OutcomeReporter} needs to report it.
 *
 * <p>Writing: {@link #apply} (or a {@link ControlTopicFollower}) decodes a control record, builds a new
 * snapshot and swaps it in; writers are serialised. A record is applied only if it is valid (as
 * {@code RecordCodec.allocationUpdates()} judges it), its key equals its experiment id, its signature
 * verifies when the table was created with a {@link SignatureVerifier}, and it is later than the one held
 * (greater sequence, definitionVersion no smaller: see {@code CompiledAllocation#isSupersededBy}); a null
 * value (tombstone) removes the experiment. Anything else is skipped and counted, never thrown.
 *
 * <p>Picks, in order: an experiment the table does not hold gets the policy's default arm; an experiment
 * past {@code validUntil} on the injected clock, running or STOPPED, gets the {@link StaleFallback} (the job
 * re-publishes a stopped experiment at every heartbeat, so only a record nobody renews goes stale); a
 * STOPPED experiment gets its winner or a draw from the record's weights ({@link StoppedPick}); otherwise a
 * draw from the current weights, {@link Assignment#HASHED} (sticky: a function of experiment, unit and
 * current weights that moves few units when the weights change, see {@link ExponentialRace}) or
 * {@link Assignment#RANDOM}.
 */
public final class AllocationTable {
    private static final Logger LOG = LoggerFactory.getLogger(AllocationTable.class);
    private static final int LOGGED_KEY_CHARS = 256;

    private final PickPolicy policy;
    private final Clock clock;
    private final String defaultArm;
    private final DoubleSupplier uniformSource;
    private final StaleFallback staleFallback;
    private final boolean winnerAfterStop;
    private final RecordCodec<AllocationUpdate> codec = RecordCodec.allocationUpdates();
    private final Counters counters = new Counters();
    private final SignatureVerifier signatures;
    private final Object writeLock = new Object();
    private volatile HashMap<String, CompiledAllocation> snapshot = new HashMap<>();

    private AllocationTable(PickPolicy policy, Clock clock, SignatureVerifier signatures) {
        this.policy = policy;
        this.signatures = signatures;
        this.clock = clock;
        this.defaultArm = policy.defaultArm();
        this.uniformSource = policy.uniformSource();
        this.staleFallback = policy.staleFallback();
        this.winnerAfterStop = policy.afterStop() == StoppedPick.WINNER;
    }

    /**
     * An empty table.
     *
     * @param policy how to pick
     * @param clock  the time against which {@code validUntil} is judged (for example {@code Clock.systemUTC()})
     */
    public static AllocationTable create(PickPolicy policy, Clock clock) {
        return new AllocationTable(Objects.requireNonNull(policy, "policy"), Objects.requireNonNull(clock, "clock"),
                null);
    }

    /**
     * An empty table that applies only control records signed by one of {@code signatures}' keys; the others
     * are skipped and counted in {@link ServingMetrics#unverifiedRecords()}.
     *
     * @param policy     how to pick
     * @param clock      the time against which {@code validUntil} is judged
     * @param signatures the trusted public keys of the job (several during a key rotation)
     */
    public static AllocationTable create(PickPolicy policy, Clock clock, SignatureVerifier signatures) {
        return new AllocationTable(Objects.requireNonNull(policy, "policy"), Objects.requireNonNull(clock, "clock"),
                Objects.requireNonNull(signatures, "signatures"));
    }

    /**
     * The arm to serve to {@code unitKey} in {@code experimentId} (see the class comment for the rules).
     * Thread-safe, lock-free, allocation-free; never throws, whatever the arguments (only an injected clock
     * or uniform source that throws could make it throw). To report what you serve, prefer {@link #assign},
     * whose answer the {@link OutcomeReporter} takes.
     *
     * @param experimentId the experiment; null or unknown gives the default arm
     * @param unitKey      the randomisation unit (user, device, session id); used in-process only, never
     *                     stored or sent. Null gives the default arm under {@link Assignment#HASHED}
     * @return an arm name, never null
     */
    public String pick(String experimentId, String unitKey) {
        counters.picks.increment();
        CompiledAllocation allocation = lookup(experimentId);
        String arm = allocation == null ? null : drawn(allocation, unitKey);
        return arm == null ? defaultArm : arm;
    }

    /**
     * The same choice as {@link #pick}, with what the reporter needs: the experiment, the unit key, the arm
     * and whether the arm was drawn for the experiment ({@link ArmAssignment#drawn()}). Thread-safe and
     * lock-free; it allocates the one small result object. Never throws.
     *
     * @param experimentId the experiment; null or unknown gives the default arm, not drawn
     * @param unitKey      the randomisation unit; kept in the result in memory, never sent by this library
     * @return the assignment, never null
     */
    public ArmAssignment assign(String experimentId, String unitKey) {
        counters.picks.increment();
        CompiledAllocation allocation = lookup(experimentId);
        String arm = allocation == null ? null : drawn(allocation, unitKey);
        return new ArmAssignment(experimentId, unitKey, arm == null ? defaultArm : arm, arm != null);
    }

    private CompiledAllocation lookup(String experimentId) {
        CompiledAllocation allocation = experimentId == null ? null : snapshot.get(experimentId);
        if (allocation == null) {
            counters.unknownExperimentPicks.increment();
        }
        return allocation;
    }

    /** What a pick from the held record draws from now, under the table's policy. */
    private enum Regime {
        /** The record's weights. */
        WEIGHTED,
        /** Every arm the record lists, equally (stale record, UNIFORM fallback). */
        UNIFORM,
        /** The winner only (STOPPED record, WINNER after-stop policy). */
        WINNER,
        /** Nothing: the default arm is served (stale record, DEFAULT_ARM fallback). */
        DEFAULT
    }

    private Regime regime(CompiledAllocation allocation, boolean stale) {
        if (stale) {
            return switch (staleFallback) {
                case LAST_WEIGHTS -> Regime.WEIGHTED;
                case UNIFORM -> Regime.UNIFORM;
                default -> Regime.DEFAULT;
            };
        }
        return allocation.stopped() && winnerAfterStop ? Regime.WINNER : Regime.WEIGHTED;
    }

    /** The arm drawn from the held record, or null (counted) when the policy serves the default arm. */
    private String drawn(CompiledAllocation allocation, String unitKey) {
        boolean stale = clock.millis() > allocation.validUntil();
        if (stale) {
            counters.stalePicks.increment();
        } else if (allocation.stopped()) {
            counters.stoppedPicks.increment();
        }
        return switch (regime(allocation, stale)) {
            case WEIGHTED -> weighted(allocation, unitKey);
            case UNIFORM -> uniform(allocation, unitKey);
            case WINNER -> allocation.winner();
            case DEFAULT -> null;
        };
    }

    private String weighted(CompiledAllocation allocation, String unitKey) {
        if (uniformSource != null) {
            return allocation.weighted(uniformSource.getAsDouble());
        }
        return unitKey == null ? missingKey() : allocation.sticky(allocation.unitHash(unitKey));
    }

    private String uniform(CompiledAllocation allocation, String unitKey) {
        if (uniformSource != null) {
            return allocation.uniform(uniformSource.getAsDouble());
        }
        return unitKey == null ? missingKey() : allocation.stickyUniform(allocation.unitHash(unitKey));
    }

    /** Counts a hashed pick without unit key; null: the default arm is served. */
    private String missingKey() {
        counters.missingUnitKeyPicks.increment();
        return null;
    }

    /** True when the table holds a record of {@code experimentId}, stale or not. */
    public boolean contains(String experimentId) {
        return experimentId != null && snapshot.containsKey(experimentId);
    }

    /** A copy of the control record held for {@code experimentId}, if any. */
    public Optional<AllocationUpdate> current(String experimentId) {
        CompiledAllocation allocation = experimentId == null ? null : snapshot.get(experimentId);
        return allocation == null ? Optional.empty()
                : Optional.of(AllocationUpdate.newBuilder(allocation.record()).build());
    }

    /** The experiments held now. */
    public Set<String> experimentIds() {
        return Set.copyOf(snapshot.keySet());
    }

    /** The counters now. */
    public ServingMetrics metrics() {
        return counters.read(snapshot.size());
    }

    /** The policy picks follow. */
    public PickPolicy policy() {
        return policy;
    }

    /**
     * Applies one control record as read from the control topic. Never throws for bad input: it is
     * skipped, counted in {@link ServingMetrics#malformedRecords()} and logged.
     *
     * @param key   the record key (experiment id)
     * @param value the record value (Avro single-object encoding or JSON), null for a tombstone
     * @return what was done
     */
    public ControlRecordOutcome apply(String key, byte[] value) {
        return write(next -> applyOne(next, key, value));
    }

    /**
     * Applies records in order and publishes one new snapshot at the end, so a batch costs one map copy.
     * Package-private: the follower's path.
     *
     * @return how many records were read
     */
    <R> int applyAll(Iterable<R> records, Function<R, String> key, Function<R, byte[]> value) {
        return write(next -> {
            int count = 0;
            for (R record : records) {
                applyOne(next, key.apply(record), value.apply(record));
                count++;
            }
            return count;
        });
    }

    private <T> T write(Function<HashMap<String, CompiledAllocation>, T> change) {
        synchronized (writeLock) {
            HashMap<String, CompiledAllocation> next = new HashMap<>(snapshot);
            T result = change.apply(next);
            snapshot = next;
            return result;
        }
    }

    private ControlRecordOutcome applyOne(HashMap<String, CompiledAllocation> next, String key, byte[] value) {
        if (key == null) {
            return malformed("(null key)", "a control record needs the experiment id as key");
        }
        if (value == null) {
            next.remove(key);
            counters.tombstones.increment();
            return ControlRecordOutcome.REMOVED;
        }
        Decoded<AllocationUpdate> decoded;
        try {
            decoded = codec.decode(value, Math.max(0, clock.millis()));
        } catch (RuntimeException e) {
            return malformed(key, "decoding failed: " + e);
        }
        if (!decoded.isValid()) {
            return malformed(key, decoded.problems().toString());
        }
        AllocationUpdate update = decoded.orThrow();
        if (!key.equals(update.getExperimentId())) {
            return malformed(key, "experimentId '" + update.getExperimentId() + "' differs from the key");
        }
        if (signatures != null) {
            SignatureVerifier.Outcome outcome = signatures.check(update);
            if (!outcome.valid()) {
                counters.unverifiedRecords.increment();
                LOG.warn("Skipped control record with key '{}': {}", shorten(key), outcome.message());
                return ControlRecordOutcome.UNVERIFIED;
            }
        }
        CompiledAllocation held = next.get(key);
        if (held != null && !held.isSupersededBy(update)) {
            counters.outdatedRecords.increment();
            return ControlRecordOutcome.OUTDATED;
        }
        next.put(key, CompiledAllocation.of(update));
        counters.recordsApplied.increment();
        return ControlRecordOutcome.APPLIED;
    }

    private ControlRecordOutcome malformed(String key, String why) {
        counters.malformedRecords.increment();
        LOG.warn("Skipped control record with key '{}': {}", shorten(key), why);
        return ControlRecordOutcome.MALFORMED;
    }

    private static String shorten(String key) {
        return key.length() > LOGGED_KEY_CHARS ? key.substring(0, LOGGED_KEY_CHARS) + "..." : key;
    }

    /**
     * Whether a pick for {@code experimentId} made now may serve {@code arm} as one drawn for the experiment:
     * the arm has weight in what the table draws from now (the held record; while stale, all its arms under
     * the {@link StaleFallback#UNIFORM} fallback, its weights under {@link StaleFallback#LAST_WEIGHTS}, none
     * under {@link StaleFallback#DEFAULT_ARM}; once STOPPED, only the winner under {@link StoppedPick#WINNER}).
     */
    boolean servable(String experimentId, String arm) {
        CompiledAllocation allocation = experimentId == null ? null : snapshot.get(experimentId);
        if (allocation == null) {
            return false;
        }
        return switch (regime(allocation, clock.millis() > allocation.validUntil())) {
            case WEIGHTED -> allocation.weight(arm) > 0;
            case UNIFORM -> allocation.lists(arm);
            case WINNER -> arm.equals(allocation.winner());
            case DEFAULT -> false;
        };
    }

    /** The live counters, for the follower's poll errors. */
    Counters counters() {
        return counters;
    }

    /** The injected clock, which the follower shares. */
    Clock clock() {
        return clock;
    }
}
