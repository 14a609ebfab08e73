package dev.runoff.client;

import dev.runoff.records.Format;
import dev.runoff.records.RecordCodec;
import dev.runoff.records.avro.AllocationUpdate;
import dev.runoff.records.avro.ArmWeight;
import dev.runoff.records.avro.ExperimentStatus;
import java.util.ArrayList;
import java.util.List;

/** Control records for tests, encoded the way the job writes them. */
final class ControlRecords {

    /** 2023-11-14T22:13:20Z, the tests' "now". */
    static final long NOW = 1_700_000_000_000L;
    /** Validity of the records built here: 15 minutes after NOW. */
    static final long VALID_UNTIL = NOW + 900_000L;

    private static final RecordCodec<AllocationUpdate> CODEC = RecordCodec.allocationUpdates();

    private ControlRecords() {
    }

    /** A RUNNING record valid until {@link #VALID_UNTIL}; {@code armsAndWeights} alternates name, weight. */
    static AllocationUpdate running(String experimentId, long sequence, Object... armsAndWeights) {
        return AllocationUpdate.newBuilder()
                .setExperimentId(experimentId)
                .setDefinitionVersion(1)
                .setSequence(sequence)
                .setWeights(weights(armsAndWeights))
                .setComputedAt(NOW - 1_000)
                .setValidUntil(VALID_UNTIL)
                .setStatus(ExperimentStatus.RUNNING)
                .setWinner(null)
                .build();
    }

    /** A STOPPED record naming {@code winner}. */
    static AllocationUpdate stopped(String experimentId, long sequence, String winner, Object... armsAndWeights) {
        return AllocationUpdate.newBuilder(running(experimentId, sequence, armsAndWeights))
                .setStatus(ExperimentStatus.STOPPED)
                .setWinner(winner)
                .build();
    }

    /** {@code record} with another validity end. */
    static AllocationUpdate validUntil(AllocationUpdate record, long validUntil) {
        return AllocationUpdate.newBuilder(record).setValidUntil(validUntil).build();
    }

    /** {@code record} with another definition version. */
    static AllocationUpdate version(AllocationUpdate record, long definitionVersion) {
        return AllocationUpdate.newBuilder(record).setDefinitionVersion(definitionVersion).build();
    }

    /** Avro single-object bytes. */
    static byte[] avro(AllocationUpdate record) {
        return CODEC.encode(record);
    }

    /** Canonical JSON bytes. */
    static byte[] json(AllocationUpdate record) {
        return CODEC.encode(record, Format.JSON);
    }

    private static List<ArmWeight> weights(Object... armsAndWeights) {
        List<ArmWeight> weights = new ArrayList<>();
        for (int i = 0; i < armsAndWeights.length; i += 2) {
            weights.add(new ArmWeight((String) armsAndWeights[i], ((Number) armsAndWeights[i + 1]).doubleValue()));
        }
        return weights;
    }
}
