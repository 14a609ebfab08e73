package dev.runoff.topology;

import java.nio.charset.StandardCharsets;
import java.util.Optional;
import java.util.Set;
import org.apache.kafka.common.utils.Utils;
import org.apache.kafka.streams.processor.StreamPartitioner;

/**
 * Where the events of one unit meet when the outcomes topic is keyed by unit id
 * ({@link TopologySettings#outcomesKeyedByUnit()}): the partition the Java client's default partitioner picks
 * for the unit id's UTF-8 bytes, {@code toPositive(murmur2(bytes)) % partitions}, as
 * {@code org.apache.kafka.clients.producer.internals.BuiltInPartitioner#partitionForKey} does in kafka-clients
 * 4.4 for a keyed record. An event read on that partition of the outcomes topic is already in the task that
 * owns its unit and goes straight to deduplication and attribution; any other event (keyed otherwise, written
 * by a producer with another partitioner such as CRC32, or read from a topic with another partition count) is
 * written to a repartition topic with this partitioner, which puts it on its unit's partition. That topic is
 * read by the same tasks as the outcomes topic (one sub-topology, so task {@code p} reads partition {@code p}
 * of both), so every event of a unit meets its unit's state in one task whichever way it came. Only the
 * partition decides: an event keyed otherwise that happens to sit on its unit's partition is already where it
 * belongs.
 *
 * <p>{@code partitions} is the repartition topic's partition count, which Kafka Streams sets to the largest
 * count of the source topics of the sub-topology that writes it (the outcomes topic and, through the merge
 * before the by-experiment repartition, the experiments topic); this object learns it the first time the
 * partitioner runs. Any count keeps the job exact; only the share of events in place depends on it. Until then no event counts as in place,
 * so the first event of each stream thread takes the repartition: correct, only slower.
 */
final class UnitPlacement implements StreamPartitioner<byte[], UnitEvent> {

    private final JobCounters counters;
    private volatile int partitions;

    UnitPlacement(JobCounters counters) {
        this.counters = counters;
    }

    /**
     * The partition of {@code unitId} among {@code partitions}, as the Java client's default partitioner
     * places a record keyed by the unit id's UTF-8 bytes.
     */
    static int partitionOf(String unitId, int partitions) {
        if (partitions < 1) {
            throw new IllegalArgumentException("partitions must be >= 1, got " + partitions);
        }
        return Utils.toPositive(Utils.murmur2(unitId.getBytes(StandardCharsets.UTF_8))) % partitions;
    }

    /** Whether {@code event}, read from the outcomes topic, is on its unit's partition; counts either path. */
    boolean inPlace(UnitEvent event) {
        int count = partitions;
        boolean in = count > 0 && event.source().partition() == partitionOf(event.unitId(), count);
        if (in) {
            counters.inPlace();
        } else {
            counters.rerouted();
        }
        return in;
    }

    @Override
    public Optional<Set<Integer>> partitions(String topic, byte[] key, UnitEvent event, int numPartitions) {
        partitions = numPartitions;
        return Optional.of(Set.of(partitionOf(event.unitId(), numPartitions)));
    }
}
