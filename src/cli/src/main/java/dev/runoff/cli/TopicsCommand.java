package dev.runoff.cli;

import dev.runoff.job.InvalidConfigException;
import dev.runoff.job.JobConfig;
import dev.runoff.job.TopicCreator;
import dev.runoff.job.TopicSpec;
import java.io.PrintWriter;
import java.time.Duration;
import java.util.List;
import java.util.Locale;
import java.util.Map;
import java.util.Optional;
import java.util.TreeMap;
import java.util.concurrent.Callable;
import org.apache.kafka.clients.admin.Admin;
import picocli.CommandLine.Command;
import picocli.CommandLine.Mixin;
import picocli.CommandLine.Model.CommandSpec;
import picocli.CommandLine.Option;
import picocli.CommandLine.ParameterException;
import picocli.CommandLine.Spec;

/** {@code runoff topics create}: the job's topics with their settings. */
@Command(name = "topics", mixinStandardHelpOptions = true, description = "Manage the job's topics.",
        subcommands = TopicsCommand.Create.class,
        exitCodeListHeading = ExitCodes.HEADING,
        exitCodeList = {"2:missing subcommand or bad arguments"})
final class TopicsCommand implements Runnable {

    @Spec
    private CommandSpec spec;

    /** Without a subcommand there is nothing to do. */
    @Override
    public void run() {
        throw new ParameterException(spec.commandLine(), "missing subcommand: create");
    }

    /**
     * Creates the missing topics and sets the promised settings on existing ones; idempotent. Prints one
     * line per topic.
     */
    @Command(name = "create", mixinStandardHelpOptions = true,
            description = "Create the job's topics (idempotent): outcomes, experiments, accepted experiments,"
                    + " allocations (control), decisions (kept forever), rejected. Existing topics keep their"
                    + " partitions and get the promised settings.",
            exitCodeListHeading = ExitCodes.HEADING,
            exitCodeList = {"0:every topic exists with its settings",
                "1:the cluster refused or did not answer within --timeout-ms",
                "2:bad arguments or an invalid configuration"})
    static final class Create implements Callable<Integer> {

        @Spec
        private CommandSpec spec;

        @Mixin
        private ClusterOptions cluster;

        @Option(names = "--partitions", defaultValue = "6", paramLabel = "N",
                description = "Partitions of each created topic (default: ${DEFAULT-VALUE}).")
        private int partitions;

        @Option(names = "--replication-factor", paramLabel = "R",
                description = "Replicas of each created topic (default: the broker's default.replication.factor).")
        private Short replicationFactor;

        @Option(names = "--timeout-ms", defaultValue = "30000", paramLabel = "MS",
                description = "How long to wait for the cluster (default: ${DEFAULT-VALUE}).")
        private long timeoutMs;

        private final Map<String, String> env;

        /** The command with the process environment. */
        Create() {
            this(System.getenv());
        }

        /** The command with {@code env} as its environment (tests). */
        Create(Map<String, String> env) {
            this.env = Map.copyOf(env);
        }

        @Override
        public Integer call() {
            JobConfig config;
            try {
                config = cluster.load(env);
            } catch (InvalidConfigException e) {
                return ConfigProblems.print(spec, e);
            }
            List<TopicSpec> specs = TopicSpec.of(config.topology());
            List<TopicCreator.Outcome> outcomes;
            Admin admin = Quiet.admin(config, timeoutMs);
            try {
                outcomes = new TopicCreator(admin, timeoutMs).ensure(specs, partitions,
                        Optional.ofNullable(replicationFactor));
            } catch (TopicCreator.NoAnswerException e) {
                return ConfigProblems.failure(spec, new IllegalStateException("no broker answered at "
                        + config.bootstrapServers() + " within " + timeoutMs + " ms", e));
            } catch (IllegalStateException e) {
                return ConfigProblems.failure(spec, e);
            } finally {
                admin.close(Duration.ofMillis(Math.min(timeoutMs, 1_000)));
            }
            PrintWriter out = spec.commandLine().getOut();
            for (int i = 0; i < specs.size(); i++) {
                TopicCreator.Outcome o = outcomes.get(i);
                out.printf("%-9s %-28s %3d partitions  %s  %s%s%n", o.status().name().toLowerCase(
                        Locale.ROOT), o.topic(), o.partitions(), new TreeMap<>(specs.get(i).configs()),
                        specs.get(i).role(), o.detail().isEmpty() ? "" : " (" + o.detail() + ")");
            }
            out.flush();
            return 0;
        }
    }
}
