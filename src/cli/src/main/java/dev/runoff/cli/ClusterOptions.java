package dev.runoff.cli;

import dev.runoff.job.JobConfig;
import java.nio.file.Path;
import java.util.Map;
import picocli.CommandLine.Option;

/**
 * How a command reaches the cluster: {@code --bootstrap-server}, or {@code --config} (the job's
 * configuration file, whose Kafka keys, security settings included, apply to the command's clients and whose
 * {@code runoff.topic.*} keys name the topics), or both (the option wins). Environment variables apply as
 * for {@code run}.
 */
final class ClusterOptions {

    @Option(names = "--bootstrap-server", paramLabel = "HOST:PORT",
            description = "Brokers to connect to (overrides bootstrap.servers of --config).")
    String bootstrapServer;

    @Option(names = "--config", paramLabel = "FILE", converter = ExistingFile.class,
            description = "Job configuration file (properties), as for run: Kafka client keys and runoff.topic.*"
                    + " names.")
    Path config;

    /**
     * The configuration, validated; {@code bootstrap.servers} is required.
     *
     * @throws dev.runoff.job.InvalidConfigException listing every problem
     */
    JobConfig load(Map<String, String> env) {
        Map<String, String> overrides = bootstrapServer == null ? Map.of()
                : Map.of("bootstrap.servers", bootstrapServer);
        return JobConfig.load(config, env, overrides, true);
    }
}
