package dev.runoff.cli;

import dev.runoff.job.InvalidConfigException;
import dev.runoff.job.JobConfig;
import dev.runoff.job.StreamsJob;
import dev.runoff.records.RecordSigner;
import java.nio.file.Path;
import java.time.Duration;
import java.util.Map;
import java.util.concurrent.Callable;
import org.apache.logging.log4j.LogManager;
import picocli.CommandLine.Command;
import picocli.CommandLine.Model.CommandSpec;
import picocli.CommandLine.Option;
import picocli.CommandLine.Spec;

/**
 * {@code runoff run --config FILE}: runs the job against a Kafka cluster until SIGTERM (or Ctrl-C), then
 * shuts down cleanly. The configuration is validated first, entirely and locally: every problem is printed
 * and nothing starts (exit code 2). Exit code 1 when the Kafka Streams client fails.
 */
@Command(name = "run", mixinStandardHelpOptions = true,
        description = "Run the job against a Kafka cluster until SIGTERM. Kafka keys in the file pass through to"
                + " Kafka Streams; job keys start with runoff.; environment variables override the file:"
                + " RUNOFF_X_Y sets runoff.x.y, KAFKA_X_Y sets x.y.",
        exitCodeListHeading = ExitCodes.HEADING,
        exitCodeList = {"0:stopped cleanly (SIGTERM or Ctrl-C)",
            "1:the Kafka Streams client failed",
            "2:bad arguments or an invalid configuration (nothing was started)"})
final class RunCommand implements Callable<Integer> {

    @Spec
    private CommandSpec spec;

    @Option(names = "--config", required = true, paramLabel = "FILE", converter = ExistingFile.class,
            description = "Job configuration file (properties).")
    private Path config;

    private final Map<String, String> env;

    /** The command with the process environment. */
    RunCommand() {
        this(System.getenv());
    }

    /** The command with {@code env} as its environment (tests). */
    RunCommand(Map<String, String> env) {
        this.env = Map.copyOf(env);
    }

    /**
     * Log4j's own shutdown hook would stop logging while the job's hook still logs its shutdown; it is
     * disabled before logging starts, and the job's hook stops logging last.
     */
    static final String LOG4J_SHUTDOWN_HOOK = "log4j2.shutdownHookEnabled";

    @Override
    public Integer call() throws InterruptedException {
        System.setProperty(LOG4J_SHUTDOWN_HOOK, "false");
        JobConfig loaded;
        RecordSigner signer;
        try {
            loaded = JobConfig.load(config, env, Map.of(), true);
            signer = loaded.signing().signer();
        } catch (InvalidConfigException e) {
            return ConfigProblems.print(spec, e);
        }
        StreamsJob job = StreamsJob.start(loaded, signer);
        Thread hook = new Thread(() -> {
            job.close();
            LogManager.shutdown();
        }, "runoff-shutdown");
        Runtime.getRuntime().addShutdownHook(hook);
        while (!job.awaitStop(Duration.ofSeconds(60))) {
            // the job runs until a shutdown hook closes it or the client fails
        }
        job.close();
        return job.failed() ? OneLineErrors.INTERNAL : 0;
    }
}
