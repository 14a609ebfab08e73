package dev.runoff.broker;

import java.time.Duration;
import java.util.Collection;
import java.util.HashMap;
import java.util.List;
import java.util.Map;
import java.util.concurrent.ExecutionException;
import java.util.concurrent.TimeUnit;
import java.util.concurrent.TimeoutException;
import org.apache.kafka.clients.admin.Admin;
import org.apache.kafka.clients.admin.AdminClientConfig;
import org.apache.kafka.clients.admin.DescribeClusterOptions;
import org.apache.kafka.clients.admin.DescribeClusterResult;
import org.apache.kafka.clients.admin.NewTopic;
import org.apache.kafka.clients.admin.ScramCredentialInfo;
import org.apache.kafka.clients.admin.ScramMechanism;
import org.apache.kafka.clients.admin.UserScramCredentialUpsertion;
import org.apache.kafka.common.KafkaFuture;
import org.apache.kafka.common.Node;
import org.apache.kafka.common.errors.TopicExistsException;
import org.apache.kafka.common.utils.Time;

/**
 * Short-lived admin-client calls against the embedded broker: the readiness probe, topic creation and SCRAM
 * users. Each call opens and closes its own client, so no connection outlives a broker restart.
 */
final class BrokerAdmin {
    private static final long PROBE_PAUSE_MS = 100;
    /** Iterations of a new SCRAM credential: 4096, the default of Kafka's SCRAM tools (Kafka SCRAM docs). */
    private static final int SCRAM_ITERATIONS = 4096;

    private final String bootstrapServers;
    private final Map<String, String> security;
    private final Duration timeout;
    private final Time time;

    /**
     * @param security client properties that reach a secured listener (empty for plaintext)
     */
    BrokerAdmin(String bootstrapServers, Map<String, String> security, Duration timeout, Time time) {
        this.bootstrapServers = bootstrapServers;
        this.security = Map.copyOf(security);
        this.timeout = timeout;
        this.time = time;
    }

    /** Creates or replaces the SCRAM credential of {@code user} for {@code mechanism}. */
    void upsertScramUser(String mechanism, String user, String password) {
        ScramCredentialInfo info = new ScramCredentialInfo(ScramMechanism.fromMechanismName(mechanism),
                SCRAM_ITERATIONS);
        try (Admin admin = open()) {
            await(admin.alterUserScramCredentials(List.of(new UserScramCredentialUpsertion(user, info, password)))
                    .all(), "add SCRAM user '" + user + "'");
        }
    }

    /**
     * Waits until {@code describeCluster} lists the broker's own node, then returns the cluster id.
     *
     * @throws EmbeddedBrokerException if the broker does not answer within the timeout
     */
    String awaitNode(int nodeId) {
        long deadline = time.milliseconds() + timeout.toMillis();
        try (Admin admin = open()) {
            while (true) {
                DescribeClusterResult cluster = admin.describeCluster(
                        new DescribeClusterOptions().timeoutMs(remainingMs(deadline)));
                if (listsNode(await(cluster.nodes(), "describe cluster"), nodeId)) {
                    return await(cluster.clusterId(), "describe cluster");
                }
                if (time.milliseconds() >= deadline) {
                    throw new EmbeddedBrokerException("broker at " + bootstrapServers + " did not list node "
                            + nodeId + " within " + timeout, null);
                }
                time.sleep(PROBE_PAUSE_MS);
            }
        }
    }

    /**
     * Creates a topic with replication factor 1.
     *
     * @return {@code true} if created, {@code false} if it existed and {@code failIfExists} is false
     * @throws IllegalStateException if the topic exists and {@code failIfExists} is true
     */
    boolean createTopic(String name, int partitions, Map<String, String> config, boolean failIfExists) {
        NewTopic topic = new NewTopic(name, partitions, (short) 1).configs(config);
        try (Admin admin = open()) {
            await(admin.createTopics(List.of(topic)).all(), "create topic '" + name + "'");
            return true;
        } catch (EmbeddedBrokerException e) {
            if (!(e.getCause() instanceof TopicExistsException)) {
                throw e;
            }
            if (failIfExists) {
                throw new IllegalStateException("topic '" + name + "' already exists on " + bootstrapServers, e);
            }
            return false;
        }
    }

    private Admin open() {
        int timeoutMs = (int) Math.min(Integer.MAX_VALUE, timeout.toMillis());
        Map<String, Object> props = new HashMap<>(security);
        props.put(AdminClientConfig.BOOTSTRAP_SERVERS_CONFIG, bootstrapServers);
        props.put(AdminClientConfig.DEFAULT_API_TIMEOUT_MS_CONFIG, timeoutMs);
        props.put(AdminClientConfig.REQUEST_TIMEOUT_MS_CONFIG, timeoutMs);
        return Admin.create(props);
    }

    private <T> T await(KafkaFuture<T> future, String what) {
        try {
            return future.get(timeout.toMillis(), TimeUnit.MILLISECONDS);
        } catch (InterruptedException e) {
            Thread.currentThread().interrupt();
            throw new EmbeddedBrokerException("interrupted while waiting to " + what + " on " + bootstrapServers, e);
        } catch (ExecutionException e) {
            throw new EmbeddedBrokerException("could not " + what + " on " + bootstrapServers + ": "
                    + e.getCause().getMessage(), e.getCause());
        } catch (TimeoutException e) {
            throw new EmbeddedBrokerException("could not " + what + " on " + bootstrapServers + " within "
                    + timeout, e);
        }
    }

    private int remainingMs(long deadline) {
        return (int) Math.max(1, Math.min(Integer.MAX_VALUE, deadline - time.milliseconds()));
    }

    private static boolean listsNode(Collection<Node> nodes, int nodeId) {
        return nodes.stream().anyMatch(node -> node.id() == nodeId);
    }
}
