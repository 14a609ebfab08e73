package dev.runoff.topology;

import dev.runoff.engine.stats.ArmStats;

/**
 * Statistics to add to one arm of one experiment, from units first seen under one definition version.
 *
 * @param experimentId the experiment
 * @param arm          the arm
 * @param version      the definition version in force when the units counted here were first exposed (the
 *                     fold drops what predates the arm's latest addition)
 * @param stats        the statistics to merge (a delta: it may hold a success without its trial)
 * @param pending      the change of the arm's pending units (unit counting: exposed, window still open)
 * @param signalUnits  per guardrail signal, how many of the units counted here had it
 * @param signalTotals per signal that value guardrails count, the sum over the units counted here of each
 *                     unit's observation (its sum of the signal's values winsorised into [0, cap], over the cap)
 */
record ArmDelta(String experimentId, String arm, long version, ArmStats stats, long pending,
                java.util.Map<String, Long> signalUnits, java.util.Map<String, Double> signalTotals) {

    /** Copies the signal counts and totals. */
    ArmDelta {
        signalUnits = java.util.Map.copyOf(signalUnits);
        signalTotals = java.util.Map.copyOf(signalTotals);
    }

    /** A delta without values of guardrail signals. */
    ArmDelta(String experimentId, String arm, long version, ArmStats stats, long pending,
             java.util.Map<String, Long> signalUnits) {
        this(experimentId, arm, version, stats, pending, signalUnits, java.util.Map.of());
    }

    /** A delta without guardrail signals. */
    ArmDelta(String experimentId, String arm, long version, ArmStats stats, long pending) {
        this(experimentId, arm, version, stats, pending, java.util.Map.of());
    }

    /** {@code a} and {@code b} summed per signal. */
    static java.util.Map<String, Long> sum(java.util.Map<String, Long> a, java.util.Map<String, Long> b) {
        if (b.isEmpty()) {
            return a;
        }
        java.util.Map<String, Long> out = new java.util.TreeMap<>(a);
        b.forEach((signal, units) -> out.merge(signal, units, Long::sum));
        return out;
    }

    /** {@code a} and {@code b} summed per signal. */
    static java.util.Map<String, Double> sumTotals(java.util.Map<String, Double> a, java.util.Map<String, Double> b) {
        if (b.isEmpty()) {
            return a;
        }
        java.util.Map<String, Double> out = new java.util.TreeMap<>(a);
        b.forEach((signal, total) -> out.merge(signal, total, Double::sum));
        return out;
    }

    /** Writes signal totals: their number, then each signal and total, in signal order. */
    static void writeTotals(BinaryOut out, java.util.Map<String, Double> signalTotals) {
        out.writeInt(signalTotals.size());
        if (signalTotals.isEmpty()) {
            return;
        }
        new java.util.TreeMap<>(signalTotals).forEach((signal, total) -> out.writeString(signal).writeDouble(total));
    }

    /** Reads what {@link #writeTotals} wrote. */
    static java.util.Map<String, Double> readTotals(BinaryIn in) {
        int count = in.readInt();
        if (count < 0 || count > 1024) {
            throw new IllegalArgumentException("corrupt internal value: " + count + " signal totals");
        }
        if (count == 0) {
            return java.util.Map.of();
        }
        java.util.Map<String, Double> out = new java.util.TreeMap<>();
        for (int i = 0; i < count; i++) {
            out.put(in.readString(), in.readDouble());
        }
        return out;
    }

    /** Writes signal counts: their number, then each signal and count, in signal order. */
    static void writeSignals(BinaryOut out, java.util.Map<String, Long> signalUnits) {
        out.writeInt(signalUnits.size());
        if (signalUnits.isEmpty()) {
            return;
        }
        new java.util.TreeMap<>(signalUnits).forEach((signal, units) -> out.writeString(signal).writeLong(units));
    }

    /** Reads what {@link #writeSignals} wrote. */
    static java.util.Map<String, Long> readSignals(BinaryIn in) {
        int count = in.readInt();
        if (count < 0 || count > 1024) {
            throw new IllegalArgumentException("corrupt internal value: " + count + " signal counts");
        }
        if (count == 0) {
            return java.util.Map.of();
        }
        java.util.Map<String, Long> out = new java.util.TreeMap<>();
        for (int i = 0; i < count; i++) {
            out.put(in.readString(), in.readLong());
        }
        return out;
    }

    /** One unit's signals as counts of 1. */
    static java.util.Map<String, Long> ofUnit(java.util.List<String> signals) {
        if (signals.isEmpty()) {
            return java.util.Map.of();
        }
        java.util.Map<String, Long> out = new java.util.TreeMap<>();
        signals.forEach(signal -> out.put(signal, 1L));
        return out;
    }

    /** {@code experimentId NUL arm NUL version}, the pre-aggregation key. */
    String key() {
        return experimentId + '\u0000' + arm + '\u0000' + version;
    }

    /** The inverse of {@link #key()} with the sums of that key. */
    static ArmDelta of(String key, ArmStats stats, long pending, java.util.Map<String, Long> signalUnits,
                       java.util.Map<String, Double> signalTotals) {
        int first = key.indexOf('\u0000');
        int last = key.lastIndexOf('\u0000');
        return new ArmDelta(key.substring(0, first), key.substring(first + 1, last),
                Long.parseLong(key.substring(last + 1)), stats, pending, signalUnits, signalTotals);
    }
}
