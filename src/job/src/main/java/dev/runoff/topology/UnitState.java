package dev.runoff.topology;

import java.util.ArrayList;
import java.util.List;


/**
 * What attribution keeps per (experiment, unit); {@link UnitCounting} decides how it changes.
 *
 * @param arm          the arm of the unit's first trial event (kept for good)
 * @param version      the definition version in force at that first trial event
 * @param unitLevel    whether the experiment counts units ({@code UNIT}) rather than exposures
 * @param firstTrialAt timestamp of its first trial event (the conversion window is measured from it)
 * @param lastTrialAt  timestamp of its latest trial event
 * @param trials       its trial events seen (counted as trials only with per-exposure counting)
 * @param successes    its successes: counted ones (per exposure, never above {@code trials}) or, with unit
 *                     counting, 1 once it converted within its window
 * @param windowMs     the experiment's conversion window at the first trial event (unit counting) or at the
 *                     last update (per exposure)
 * @param counted      unit counting: whether the unit has entered its arm's trials (its window closed)
 * @param touchedAt    wall-clock time of the last update, for the clean-up
 * @param signals      unit counting: the guardrail signals the unit had within its window, sorted, each once
 * @param valueCap     value per unit: the metric's cap at the first trial event (kept for good); NaN for every
 *                     other metric
 * @param valueSum     value per unit: the sum of the unit's values within its window so far, not capped (0
 *                     without value events)
 * @param signalValues value guardrails: per signal they count that the unit had, the cap and the sum of the
 *                     signal's values within its window so far, not capped; sorted by signal, each once
 */
record UnitState(String arm, long version, boolean unitLevel, long firstTrialAt, long lastTrialAt, long trials,
                 long successes, long windowMs, boolean counted, long touchedAt, List<String> signals,
                 double valueCap, double valueSum, List<SignalValue> signalValues) {

    /**
     * The newest entry format without seen event ids; {@link UnitEntry} writes a later one. An earlier job's
     * entries are read here: 2 (before guardrail signals), 3 (before values per unit: no cap, no sum), 4 (before
     * value guardrails) and 5.
     */
    static final int LAST_FORMAT = 5;
    /** The format before value guardrails; entries an earlier job wrote are still read (no signal values). */
    private static final int FORMAT_WITHOUT_SIGNAL_VALUES = 4;
    /** The format before guardrail signals; entries an earlier job wrote are still read (no signals). */
    private static final int FORMAT_WITHOUT_SIGNALS = 2;

    /** Copies the signals and their values. */
    UnitState {
        signals = List.copyOf(signals);
        signalValues = List.copyOf(signalValues);
    }

    /** A unit without values of guardrail signals. */
    UnitState(String arm, long version, boolean unitLevel, long firstTrialAt, long lastTrialAt, long trials,
              long successes, long windowMs, boolean counted, long touchedAt, List<String> signals,
              double valueCap, double valueSum) {
        this(arm, version, unitLevel, firstTrialAt, lastTrialAt, trials, successes, windowMs, counted, touchedAt,
                signals, valueCap, valueSum, List.of());
    }

    /**
     * The running sum of one signal's values for the value guardrails that count it.
     *
     * @param signal the signal
     * @param cap    those guardrails' valueCap, as the signal's first event carried it
     * @param sum    the sum of the signal's values so far, not capped
     */
    record SignalValue(String signal, double cap, double sum) {

        /** The unit's observation: its sum winsorised into [0, cap], over the cap, in [0, 1]. */
        double observation() {
            return winsorised(sum, cap) / cap;
        }
    }

    /** A unit without a value per unit. */
    UnitState(String arm, long version, boolean unitLevel, long firstTrialAt, long lastTrialAt, long trials,
              long successes, long windowMs, boolean counted, long touchedAt, List<String> signals) {
        this(arm, version, unitLevel, firstTrialAt, lastTrialAt, trials, successes, windowMs, counted, touchedAt,
                signals, Double.NaN, 0);
    }

    /** A unit without guardrail signals and without a value per unit. */
    UnitState(String arm, long version, boolean unitLevel, long firstTrialAt, long lastTrialAt, long trials,
              long successes, long windowMs, boolean counted, long touchedAt) {
        this(arm, version, unitLevel, firstTrialAt, lastTrialAt, trials, successes, windowMs, counted, touchedAt,
                List.of());
    }

    /** Whether the unit belongs to a value-per-unit metric (it has a cap). */
    boolean valuePerUnit() {
        return !Double.isNaN(valueCap);
    }

    /** This unit with {@code signal} among its signals (once), touched at {@code now}. */
    UnitState withSignal(String signal, long now) {
        java.util.TreeSet<String> all = new java.util.TreeSet<>(signals);
        all.add(signal);
        return new UnitState(arm, version, unitLevel, firstTrialAt, lastTrialAt, trials, successes, windowMs, counted,
                now, List.copyOf(all), valueCap, valueSum, signalValues);
    }

    /**
     * This unit with {@code value} added to the sum of {@code signal}'s values (started with {@code cap} at
     * the signal's first value), touched at {@code now}.
     */
    UnitState withSignalValue(String signal, double cap, double value, long now) {
        java.util.TreeMap<String, SignalValue> all = new java.util.TreeMap<>();
        signalValues.forEach(v -> all.put(v.signal(), v));
        all.merge(signal, new SignalValue(signal, cap, value),
                (old, added) -> new SignalValue(signal, old.cap(), old.sum() + value));
        return new UnitState(arm, version, unitLevel, firstTrialAt, lastTrialAt, trials, successes, windowMs, counted,
                now, signals, valueCap, valueSum, List.copyOf(all.values()));
    }

    /** This unit with {@code value} added to its sum, touched at {@code now}. */
    UnitState withValue(double value, long now) {
        return new UnitState(arm, version, unitLevel, firstTrialAt, lastTrialAt, trials, successes, windowMs, counted,
                now, signals, valueCap, valueSum + value, signalValues);
    }

    /** This unit marked counted at {@code now}. */
    UnitState countedAt(long now) {
        return new UnitState(arm, version, true, firstTrialAt, lastTrialAt, trials, successes, windowMs, true, now,
                signals, valueCap, valueSum, signalValues);
    }

    /** Value guardrails: per signal the unit had, its observation in [0, 1] (see {@link SignalValue}). */
    java.util.Map<String, Double> signalObservations() {
        java.util.Map<String, Double> out = new java.util.TreeMap<>();
        signalValues.forEach(v -> out.put(v.signal(), v.observation()));
        return out;
    }

    /** Value per unit: the unit's observation, its sum winsorised into [0, cap] (see {@link UnitCounting}). */
    double cappedValue() {
        return winsorised(valueSum, valueCap);
    }

    /**
     * {@code sum} winsorised into [0, cap], the rule of values per unit and of value guardrails alike.
     * {@code Math.min}/{@code max} only, so the result is the same bits on every JVM.
     */
    static double winsorised(double sum, double cap) {
        return Math.min(cap, Math.max(0.0, sum));
    }

    /** When the unit's conversion window closes: its first trial event's timestamp plus the window. */
    long closesAt() {
        return firstTrialAt > Long.MAX_VALUE - windowMs ? Long.MAX_VALUE : firstTrialAt + windowMs;
    }

    /** Whether the clean-up may drop this entry at {@code now}: idle past its window plus the margin, counted. */
    boolean expired(long now, long marginMs) {
        long idle = now - touchedAt;
        return (counted || !unitLevel) && idle > windowMs && idle - windowMs > marginMs;
    }

    /** Writes this unit's fields as format {@link #LAST_FORMAT} lays them out, after the format byte. */
    void write(BinaryOut out) {
        out.writeString(arm).writeLong(version).writeBoolean(unitLevel).writeLong(firstTrialAt)
                .writeLong(lastTrialAt).writeLong(trials).writeLong(successes).writeLong(windowMs)
                .writeBoolean(counted).writeLong(touchedAt).writeInt(signals.size());
        signals.forEach(out::writeString);
        out.writeDouble(valueCap).writeDouble(valueSum).writeInt(signalValues.size());
        signalValues.forEach(v -> out.writeString(v.signal()).writeDouble(v.cap()).writeDouble(v.sum()));
    }

    /** Whether {@code format} is one whose unit fields {@link #read} knows (2 to {@link #LAST_FORMAT}). */
    static boolean known(int format) {
        return format >= FORMAT_WITHOUT_SIGNALS && format <= LAST_FORMAT;
    }

    /**
     * Reads a unit's fields laid out as {@code format} (2 to {@link #LAST_FORMAT}) lays them out, after the
     * format byte; fields the format has not got take their empty values.
     */
    static UnitState read(BinaryIn in, int format) {
        if (!known(format)) {
            throw new IllegalArgumentException("unit entry format " + format + " is not one of 2 to " + LAST_FORMAT);
        }
        boolean values = format >= FORMAT_WITHOUT_SIGNAL_VALUES;
        return new UnitState(in.readString(), in.readLong(), in.readBoolean(), in.readLong(),
                in.readLong(), in.readLong(), in.readLong(), in.readLong(), in.readBoolean(), in.readLong(),
                format == FORMAT_WITHOUT_SIGNALS ? List.of() : readSignals(in),
                values ? in.readDouble() : Double.NaN, values ? in.readDouble() : 0,
                format == LAST_FORMAT ? readSignalValues(in) : List.of());
    }

    private static List<SignalValue> readSignalValues(BinaryIn in) {
        int count = in.readInt();
        if (count < 0 || count > 64) {
            throw new IllegalArgumentException("corrupt unit entry: " + count + " signal values");
        }
        List<SignalValue> values = new ArrayList<>(count);
        for (int i = 0; i < count; i++) {
            values.add(new SignalValue(in.readString(), in.readDouble(), in.readDouble()));
        }
        return values;
    }

    private static List<String> readSignals(BinaryIn in) {
        int count = in.readInt();
        if (count < 0 || count > 64) {
            throw new IllegalArgumentException("corrupt unit entry: " + count + " signals");
        }
        List<String> signals = new ArrayList<>(count);
        for (int i = 0; i < count; i++) {
            signals.add(in.readString());
        }
        return signals;
    }
}
