package dev.runoff.broker;

import java.nio.file.Path;
import java.util.LinkedHashMap;
import java.util.Map;

/**
 * Server properties of a one-node KRaft broker that is its own controller.
 *
 * <p>Internal topics (consumer offsets, transaction state, share-group state) default to replication
 * factor 3 and are never created on a single node unless lowered to 1; the transaction state and
 * share-group state topics carry their own minimum in-sync replica setting, lowered to 1 as well (the
 * offsets topic follows the broker-wide {@code min.insync.replicas}, pinned to 1). Without them
 * transactional producers and exactly-once Kafka Streams cannot start.
 * The log cleaner dedupe buffer is cut from its 128 MiB default to 2 MiB so a small heap suffices.
 */
final class BrokerProperties {
    /** The node id of the only node: broker and controller. */
    static final int NODE_ID = 1;

    private BrokerProperties() {
    }

    /**
     * Builds the properties.
     *
     * @param logDirectory the directory holding both the metadata log and the topic data
     * @param ports the listener ports
     * @param security how the client listener is secured, or {@code null} for plaintext
     * @param overrides properties that replace or add to the defaults (applied last)
     * @return a new mutable map, in a stable order
     */
    static Map<String, String> of(Path logDirectory, BrokerPorts ports, BrokerSecurity security,
                                  Map<String, String> overrides) {
        Map<String, String> props = new LinkedHashMap<>();
        props.putAll(roles(ports));
        props.putAll(listeners(ports, clientListener(security)));
        if (security != null) {
            props.putAll(security.serverProperties());
        }
        props.put("log.dirs", logDirectory.toAbsolutePath().toString());
        props.putAll(singleReplicaInternalTopics());
        props.put("group.initial.rebalance.delay.ms", "0");
        props.put("log.cleaner.dedupe.buffer.size", "2097152");
        props.put("auto.create.topics.enable", "false");
        props.putAll(overrides);
        return props;
    }

    private static Map<String, String> roles(BrokerPorts ports) {
        return Map.of(
                "process.roles", "broker,controller",
                "node.id", Integer.toString(NODE_ID),
                "controller.quorum.voters", NODE_ID + "@" + BrokerPorts.HOST + ":" + ports.controller());
    }

    /**
     * The name of the client listener, which is also its security protocol: {@code PLAINTEXT}, {@code SSL} or
     * {@code SASL_SSL}. It is the inter-broker listener too, so with SCRAM the broker authenticates to itself.
     */
    static String clientListener(BrokerSecurity security) {
        return security == null ? BrokerPorts.CLIENT_LISTENER : security.protocol();
    }

    private static Map<String, String> listeners(BrokerPorts ports, String client) {
        String controller = BrokerPorts.CONTROLLER_LISTENER;
        return Map.of(
                "listeners", client + "://" + ports.bootstrapServers()
                        + "," + controller + "://" + BrokerPorts.HOST + ":" + ports.controller(),
                "advertised.listeners", client + "://" + ports.bootstrapServers(),
                "listener.security.protocol.map", client + ":" + client + "," + controller + ":PLAINTEXT",
                "controller.listener.names", controller,
                "inter.broker.listener.name", client);
    }

    private static Map<String, String> singleReplicaInternalTopics() {
        return Map.of(
                "offsets.topic.replication.factor", "1",
                "min.insync.replicas", "1",
                "transaction.state.log.replication.factor", "1",
                "transaction.state.log.min.isr", "1",
                "share.coordinator.state.topic.replication.factor", "1",
                "share.coordinator.state.topic.min.isr", "1");
    }
}
