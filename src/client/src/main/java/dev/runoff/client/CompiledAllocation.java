package dev.runoff.client;

import dev.runoff.records.avro.AllocationUpdate;
import dev.runoff.records.avro.ArmWeight;
import dev.runoff.records.avro.ExperimentStatus;
import java.util.List;

/**
 * One valid control record turned into what a pick needs: arm names, cumulative weights and the hash salt,
 * computed once when the record arrives so that a pick only hashes, compares and indexes. Immutable.
 */
final class CompiledAllocation {

    /** Seed of the salt hash; changing it reassigns every unit (it is part of the hash contract). */
    static final long SALT_SEED = 0x52554E4F46460001L;

    private final AllocationUpdate record;
    private final String[] arms;
    private final double[] cumulative;
    private final long salt;
    private final boolean stopped;

    private CompiledAllocation(AllocationUpdate record, String[] arms, double[] cumulative, long salt) {
        this.record = record;
        this.arms = arms;
        this.cumulative = cumulative;
        this.salt = salt;
        this.stopped = record.getStatus() == ExperimentStatus.STOPPED;
    }

    /** Compiles a record that {@code RecordCodec.allocationUpdates()} accepted. */
    static CompiledAllocation of(AllocationUpdate record) {
        List<ArmWeight> weights = record.getWeights();
        int n = weights.size();
        String[] arms = new String[n];
        double[] partial = new double[n];
        double sum = 0;
        for (int i = 0; i < n; i++) {
            arms[i] = weights.get(i).getArm();
            sum += weights.get(i).getWeight();
            partial[i] = sum;
        }
        // Dividing by the final partial sum makes the last entry exactly 1.0 (x / x == 1 in IEEE 754), and
        // trailing zero weights repeat it, so every u in [0, 1) finds an arm and no zero-weight arm is chosen.
        double[] cumulative = new double[n];
        for (int i = 0; i < n; i++) {
            cumulative[i] = partial[i] / sum;
        }
        return new CompiledAllocation(record, arms, cumulative, salt(record));
    }

    /**
     * Salt of deterministic picks: a hash of the experiment id and of every (arm, weight) pair, bit for bit.
     * Two records with the same weights (a heartbeat, or the record a newly started replica reads from the
     * compacted topic) get the same salt, so a unit keeps its arm until the weights change.
     */
    private static long salt(AllocationUpdate record) {
        long h = UnitHash.hash64(SALT_SEED, record.getExperimentId());
        for (ArmWeight weight : record.getWeights()) {
            h = UnitHash.mix64(h ^ UnitHash.hash64(SALT_SEED, weight.getArm())) + UnitHash.GOLDEN_GAMMA;
            h = UnitHash.mix64(h ^ Double.doubleToLongBits(weight.getWeight())) + UnitHash.GOLDEN_GAMMA;
        }
        return UnitHash.mix64(h);
    }

    /** The decoded control record; shared, so callers must not modify it. */
    AllocationUpdate record() {
        return record;
    }

    boolean stopped() {
        return stopped;
    }

    String winner() {
        return record.getWinner();
    }

    long validUntil() {
        return record.getValidUntil();
    }

    /**
     * True when {@code newer} is a later record the job could have written after this one: a greater
     * sequence (the job numbers an experiment's control records 1, 2, 3, ... across definition versions) and a
     * definitionVersion no smaller (the job moves it forward only together with the sequence). A record that
     * raises the version without raising the sequence is not one the job can produce.
     */
    boolean isSupersededBy(AllocationUpdate newer) {
        return newer.getSequence() > record.getSequence()
                && newer.getDefinitionVersion() >= record.getDefinitionVersion();
    }

    /** Deterministic position in [0, 1) of {@code unitKey} under this record's salt. */
    double positionOf(String unitKey) {
        return UnitHash.toUnitInterval(UnitHash.hash64(salt, unitKey));
    }

    /** The arm whose cumulative interval [c(i-1), c(i)) holds {@code u}; binary search, no allocation. */
    String weighted(double u) {
        int lo = 0;
        int hi = cumulative.length - 1;
        while (lo < hi) {
            int mid = (lo + hi) >>> 1;
            if (u < cumulative[mid]) {
                hi = mid;
            } else {
                lo = mid + 1;
            }
        }
        return arms[lo];
    }

    /** Every arm with equal probability. */
    String uniform(double u) {
        int index = (int) (u * arms.length);
        return arms[Math.min(index, arms.length - 1)];
    }
}
