package dev.runoff.client;

import java.util.concurrent.atomic.LongAdder;

/** The live counters behind {@link ServingMetrics}; {@link LongAdder} so that request threads do not contend. */
final class Counters {
    final LongAdder picks = new LongAdder();
    final LongAdder unknownExperimentPicks = new LongAdder();
    final LongAdder missingUnitKeyPicks = new LongAdder();
    final LongAdder stalePicks = new LongAdder();
    final LongAdder stoppedPicks = new LongAdder();
    final LongAdder recordsApplied = new LongAdder();
    final LongAdder tombstones = new LongAdder();
    final LongAdder malformedRecords = new LongAdder();
    final LongAdder outdatedRecords = new LongAdder();
    final LongAdder pollErrors = new LongAdder();
    final LongAdder unverifiedRecords = new LongAdder();

    ServingMetrics read(int experiments) {
        return new ServingMetrics(picks.sum(), unknownExperimentPicks.sum(), missingUnitKeyPicks.sum(),
                stalePicks.sum(), stoppedPicks.sum(), recordsApplied.sum(), tombstones.sum(),
                malformedRecords.sum(), outdatedRecords.sum(), pollErrors.sum(), experiments,
                unverifiedRecords.sum());
    }
}
