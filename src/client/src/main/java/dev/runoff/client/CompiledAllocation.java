package dev.runoff.client;

import dev.runoff.records.avro.AllocationUpdate;
import dev.runoff.records.avro.ArmWeight;
import dev.runoff.records.avro.ExperimentStatus;
import java.util.Arrays;
import java.util.List;

/**
 * One valid control record turned into what a pick needs, computed once when the record arrives so that a
 * pick only hashes, compares and indexes: the experiment's hash seed, the sticky race over the record's
 * weights and over all its arms equally (stale fallback), and cumulative weights for random draws. Immutable.
 */
final class CompiledAllocation {

    /** Seed of the experiment hash; changing it reassigns every unit (it is part of the hash contract). */
    static final long EXPERIMENT_SEED = 0x52554E4F46460001L;

    private final AllocationUpdate record;
    private final String[] arms;
    private final double[] cumulative;
    private final long experimentSeed;
    private final ExponentialRace weighted;
    private final ExponentialRace uniform;
    private final boolean stopped;

    private CompiledAllocation(AllocationUpdate record, String[] arms, double[] weights) {
        this.record = record;
        this.arms = arms;
        this.cumulative = cumulative(weights);
        this.experimentSeed = UnitHash.hash64(EXPERIMENT_SEED, record.getExperimentId());
        List<String> names = List.of(arms);
        this.weighted = ExponentialRace.of(experimentSeed, names, weights);
        double[] equal = new double[arms.length];
        Arrays.fill(equal, 1.0);
        this.uniform = ExponentialRace.of(experimentSeed, names, equal);
        this.stopped = record.getStatus() == ExperimentStatus.STOPPED;
    }

    /** Compiles a record that {@code RecordCodec.allocationUpdates()} accepted. */
    static CompiledAllocation of(AllocationUpdate record) {
        List<ArmWeight> list = record.getWeights();
        String[] arms = new String[list.size()];
        double[] weights = new double[list.size()];
        for (int i = 0; i < arms.length; i++) {
            arms[i] = list.get(i).getArm();
            weights[i] = list.get(i).getWeight();
        }
        return new CompiledAllocation(record, arms, weights);
    }

    private static double[] cumulative(double[] weights) {
        double[] partial = new double[weights.length];
        double sum = 0;
        for (int i = 0; i < weights.length; i++) {
            sum += weights[i];
            partial[i] = sum;
        }
        // Dividing by the final partial sum makes the last entry exactly 1.0 (x / x == 1 in IEEE 754), and
        // trailing zero weights repeat it, so every u in [0, 1) finds an arm and no zero-weight arm is chosen.
        for (int i = 0; i < weights.length; i++) {
            partial[i] /= sum;
        }
        return partial;
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

    /**
     * Hash of {@code unitKey} under the experiment's seed: a function of (experiment id, unit key) only, the
     * same for every record of the experiment.
     */
    long unitHash(String unitKey) {
        return UnitHash.hash64(experimentSeed, unitKey);
    }

    /** The sticky choice from the record's weights ({@link ExponentialRace}). */
    String sticky(long unitHash) {
        return weighted.winner(unitHash);
    }

    /** The sticky choice among all the record's arms with equal weights. */
    String stickyUniform(long unitHash) {
        return uniform.winner(unitHash);
    }

    /** The record's weight of {@code arm}; 0 for an arm the record does not list. */
    double weight(String arm) {
        for (ArmWeight w : record.getWeights()) {
            if (w.getArm().equals(arm)) {
                return w.getWeight();
            }
        }
        return 0.0;
    }

    /** Whether the record lists {@code arm}. */
    boolean lists(String arm) {
        return Arrays.asList(arms).contains(arm);
    }

    /** The arm whose cumulative interval [c(i-1), c(i)) holds {@code u} in [0, 1); binary search. */
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

    /** Every arm with equal probability, from {@code u} in [0, 1). */
    String uniform(double u) {
        int index = (int) (u * arms.length);
        return arms[Math.min(index, arms.length - 1)];
    }
}
