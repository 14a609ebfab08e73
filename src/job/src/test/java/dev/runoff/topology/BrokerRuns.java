package dev.runoff.topology;

import dev.runoff.records.Definitions;
import dev.runoff.records.avro.ExperimentDefinition;
import dev.runoff.records.avro.StoppingSpec;
import java.time.Duration;
import org.apache.kafka.streams.KafkaStreams;
import org.apache.kafka.streams.StoreQueryParameters;
import org.apache.kafka.streams.state.QueryableStoreTypes;
import org.apache.kafka.streams.state.ReadOnlyKeyValueStore;

/** What the broker tests of the topology share: definitions that never stop, and waiting for them. */
final class BrokerRuns {
    private BrokerRuns() {
    }

    /**
     * {@code def}, changed to never stop, recompute every second and send heartbeats as often as allowed: the
     * tests read their counts from CONTINUE decisions.
     */
    static ExperimentDefinition endless(ExperimentDefinition def) {
        def.setStopping(StoppingSpec.newBuilder(def.getStopping()).setMinTrialsPerArm(1_000_000_000L).build());
        def.setRecomputePeriodMs(1_000);
        def.setHeartbeatMs(Definitions.MIN_HEARTBEAT_MS);
        return def;
    }

    /** Waits until the definitions store holds at least {@code count} entries, failing after {@code timeout}. */
    static void awaitAccepted(KafkaStreams streams, int count, Duration timeout) throws InterruptedException {
        long deadline = System.nanoTime() + timeout.toNanos();
        while (System.nanoTime() < deadline) {
            ReadOnlyKeyValueStore<String, byte[]> store = streams.store(StoreQueryParameters.fromNameAndType(
                    RunoffTopology.DEFINITIONS_STORE, QueryableStoreTypes.keyValueStore()));
            if (store.approximateNumEntries() >= count) {
                return;
            }
            Thread.sleep(100);
        }
        throw new AssertionError("definitions were not accepted within " + timeout);
    }
}
