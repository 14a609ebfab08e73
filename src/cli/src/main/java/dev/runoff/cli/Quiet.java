package dev.runoff.cli;

import dev.runoff.job.JobConfig;
import dev.runoff.job.TopicCreator;
import org.apache.kafka.clients.admin.Admin;
import org.apache.logging.log4j.Level;
import org.apache.logging.log4j.core.config.Configurator;

/**
 * Short-lived cluster commands report an unreachable broker as one line of their own: the Kafka network
 * client's warning per failed connection attempt ("Connection to node -1 could not be established") would
 * repeat it many times, so it is kept to errors.
 */
final class Quiet {
    /** The logger of the Kafka client's connection warnings. */
    static final String NETWORK_CLIENT = "org.apache.kafka.clients.NetworkClient";

    private Quiet() {
    }

    /** An admin client that honours {@code timeoutMs}, with the connection warnings silenced. */
    static Admin admin(JobConfig config, long timeoutMs) {
        connectionWarnings();
        return TopicCreator.admin(config, timeoutMs);
    }

    /** Keeps the network client's per-attempt connection warnings out of the command's output. */
    static void connectionWarnings() {
        Configurator.setLevel(NETWORK_CLIENT, Level.ERROR);
    }
}
