package dev.runoff.job;

import dev.runoff.decision.ExperimentState;
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
 * partition, and when another instance is active, names it by its {@code application.server}. Without
 * {@code application.server} (one instance, the demo) it queries every partition held here.
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
            // without application.server Kafka Streams keeps no metadata: this instance answers for itself
            return self == null ? local(id, null, null)
                    : new Lookup.Unavailable("no instance holds the partition of this key yet (rebalancing)");
        }
        HostInfo active = metadata.activeHost();
        if (known(active) && self != null && !active.equals(self)) {
            return elsewhere(metadata);
        }
        return local(id, metadata, Set.of(metadata.partition()));
    }

    /** Queries this instance's active stores (of {@code partitions}, or all when null). */
    private Lookup local(String id, KeyQueryMetadata metadata, Set<Integer> partitions) {
        StateQueryRequest<ExperimentState> request = StateQueryRequest.inStore(RunoffTopology.EXPERIMENTS_STORE)
                .withQuery(KeyQuery.<String, ExperimentState>withKey(id));
        request = (partitions == null ? request.withAllPartitions() : request.withPartitions(partitions))
                .requireActive();
        StateQueryResult<ExperimentState> result = streams.query(request);
        boolean answered = false;
        QueryResult<ExperimentState> failure = null;
        for (QueryResult<ExperimentState> partition : result.getPartitionResults().values()) {
            if (partition.isSuccess()) {
                answered = true;
                if (partition.getResult() != null) {
                    return new Lookup.Found(ExperimentJson.of(partition.getResult()));
                }
            } else {
                failure = partition;
            }
        }
        if (answered) {
            return new Lookup.NotFound();
        }
        if (failure != null && failure.getFailureReason() == FailureReason.NOT_ACTIVE && metadata != null
                && known(metadata.activeHost())) {
            return elsewhere(metadata);
        }
        return new Lookup.Unavailable(failure == null ? "no partition of the store is held here"
                : failure.getFailureReason() + ": " + failure.getFailureMessage());
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
