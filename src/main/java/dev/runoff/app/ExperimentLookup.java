package dev.runoff.app;

import dev.runoff.topology.ExperimentState;
import dev.runoff.topology.RunoffTopology;
import java.util.List;
import java.util.Set;
import org.apache.kafka.common.serialization.Serdes;
import org.apache.kafka.streams.KafkaStreams;
import org.apache.kafka.streams.KeyQueryMetadata;
import org.apache.kafka.streams.query.FailureReason;
import org.apache.kafka.streams.query.KeyQuery;
import org.apache.kafka.streams.query.QueryResult;
import org.apache.kafka.streams.query.StateQueryRequest;
import org.apache.kafka.streams.query.StateQueryResult;
import org.apache.kafka.streams.state.HostInfo;

/**
 * Reads one experiment's state through interactive queries (IQv2): asks Kafka Streams which partition and
 * instance hold the key ({@code queryMetadataForKey}), queries this instance's active store for that
 * partition, and when another instance is active, names it by its {@code application.server}.
 */
final class ExperimentLookup {

    private final KafkaStreams streams;
    private final HostInfo self;

    /**
     * @param streams the running client
     * @param self    this instance's {@code application.server}, or {@code null} when not configured
     */
    ExperimentLookup(KafkaStreams streams, HostInfo self) {
        this.streams = streams;
        this.self = self;
    }

    /** The state of experiment {@code id}, or where it is. */
    Lookup find(String id) {
        if (streams.state() != KafkaStreams.State.RUNNING) {
            return new Lookup.Unavailable("the job is " + streams.state() + ", not RUNNING");
        }
        KeyQueryMetadata metadata = streams.queryMetadataForKey(RunoffTopology.EXPERIMENTS_STORE, id,
                Serdes.String().serializer());
        if (metadata == null || metadata.equals(KeyQueryMetadata.NOT_AVAILABLE)) {
            return new Lookup.Unavailable("no instance holds the partition of this key yet (rebalancing)");
        }
        HostInfo active = metadata.activeHost();
        if (known(active) && self != null && !active.equals(self)) {
            return elsewhere(metadata);
        }
        StateQueryRequest<ExperimentState> request = StateQueryRequest.inStore(RunoffTopology.EXPERIMENTS_STORE)
                .withQuery(KeyQuery.<String, ExperimentState>withKey(id))
                .withPartitions(Set.of(metadata.partition()))
                .requireActive();
        StateQueryResult<ExperimentState> result = streams.query(request);
        QueryResult<ExperimentState> partition = result.getPartitionResults().get(metadata.partition());
        if (partition == null) {
            return new Lookup.Unavailable("no answer for partition " + metadata.partition());
        }
        if (partition.isSuccess()) {
            ExperimentState state = partition.getResult();
            return state == null ? new Lookup.NotFound() : new Lookup.Found(ExperimentJson.of(state));
        }
        if (partition.getFailureReason() == FailureReason.NOT_ACTIVE && known(active)) {
            return elsewhere(metadata);
        }
        return new Lookup.Unavailable(partition.getFailureReason() + ": " + partition.getFailureMessage());
    }

    private static Lookup elsewhere(KeyQueryMetadata metadata) {
        List<String> standbys = metadata.standbyHosts().stream().filter(ExperimentLookup::known)
                .map(ExperimentLookup::address).sorted().toList();
        return new Lookup.Elsewhere(address(metadata.activeHost()), standbys);
    }

    private static boolean known(HostInfo host) {
        return host != null && host.port() > 0;
    }

    private static String address(HostInfo host) {
        return host.host() + ":" + host.port();
    }
}
