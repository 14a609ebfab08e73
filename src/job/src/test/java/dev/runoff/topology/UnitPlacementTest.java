package dev.runoff.topology;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.runoff.engine.core.Metric;
import java.nio.charset.StandardCharsets;
import java.util.List;
import java.util.Optional;
import java.util.Set;
import java.util.SplittableRandom;
import java.util.zip.CRC32;
import org.apache.kafka.clients.producer.internals.BuiltInPartitioner;
import org.junit.jupiter.api.Test;

/** Which events of a unit-keyed outcomes topic skip the repartition, and where the others go. */
class UnitPlacementTest {

    private final JobCounters counters = new JobCounters();
    private final UnitPlacement placement = new UnitPlacement(counters);

    @Test
    void unitsGoWhereTheJavaClientsDefaultPartitionerPutsTheirKeys() {
        // Reference: kafka-clients 4.4.0, BuiltInPartitioner.partitionForKey, the partition its default
        // partitioner gives a record with a key (murmur2 of the key bytes, made positive, modulo the count).
        SplittableRandom random = new SplittableRandom(15);
        List<String> ids = new java.util.ArrayList<>(List.of("u1", "", "unité-ø", "用户-42", "a\u0000b"));
        for (int i = 0; i < 2_000; i++) {
            ids.add("user-" + Long.toHexString(random.nextLong()));
        }
        for (String id : ids) {
            for (int partitions = 1; partitions <= 12; partitions++) {
                assertEquals(BuiltInPartitioner.partitionForKey(id.getBytes(StandardCharsets.UTF_8), partitions),
                        UnitPlacement.partitionOf(id, partitions), id + " of " + partitions);
            }
        }
    }

    @Test
    void noEventIsInPlaceBeforeThePartitionCountIsKnown() {
        assertFalse(placement.inPlace(event("u1", 0)));
        assertEquals(1, counters.reroutedEvents());
        assertEquals(0, counters.inPlaceEvents());
    }

    @Test
    void anEventOnItsUnitsPartitionStaysAndAnyOtherGoesThere() {
        String unit = "user-7";
        int home = UnitPlacement.partitionOf(unit, 4);
        assertEquals(Optional.of(Set.of(home)), placement.partitions("t", new byte[0], event(unit, 3), 4),
                "a rerouted event goes to its unit's partition");
        assertTrue(placement.inPlace(event(unit, home)));
        for (int other = 0; other < 4; other++) {
            if (other != home) {
                assertFalse(placement.inPlace(event(unit, other)), "read on partition " + other);
            }
        }
        assertEquals(1, counters.inPlaceEvents());
        assertEquals(3, counters.reroutedEvents());
    }

    @Test
    void aUnitPlacedByCrc32ElsewhereIsRerouted() {
        // Producers in other languages often partition by CRC32 of the key (common practice): find units that
        // CRC32 puts on another partition than murmur2 does and check they are not taken as in place.
        placement.partitions("t", new byte[0], event("any", 0), 6);
        int differing = 0;
        for (int i = 0; i < 100; i++) {
            String unit = "visitor-" + i;
            CRC32 crc = new CRC32();
            crc.update(unit.getBytes(StandardCharsets.UTF_8));
            int byCrc = (int) (crc.getValue() % 6);
            boolean same = byCrc == UnitPlacement.partitionOf(unit, 6);
            assertEquals(same, placement.inPlace(event(unit, byCrc)), unit);
            differing += same ? 0 : 1;
        }
        assertTrue(differing > 50, "most units land elsewhere under CRC32: " + differing);
        assertEquals(differing, counters.reroutedEvents());
    }

    @Test
    void aPartitionCountBelowOneIsRefused() {
        assertEquals("partitions must be >= 1, got 0", assertThrows(IllegalArgumentException.class,
                () -> UnitPlacement.partitionOf("u1", 0)).getMessage());
    }

    private static UnitEvent event(String unit, int partition) {
        return new UnitEvent("hero", unit, unit + "-x", UnitEvent.Role.TRIAL, Metric.BERNOULLI, "a", Double.NaN,
                1L, 1_000L, 1L, true, 1_000L, new Source("runoff.outcomes", partition, 0L), null, new byte[]{1});
    }
}
