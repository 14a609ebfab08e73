package dev.runoff.cli;

import dev.runoff.demo.Demo;
import dev.runoff.demo.DemoOptions;
import dev.runoff.demo.DemoSummary;
import java.nio.file.Path;
import java.time.Clock;
import java.util.HashMap;
import java.util.Map;
import java.util.Optional;
import java.util.concurrent.Callable;
import org.apache.logging.log4j.Level;
import org.apache.logging.log4j.LogManager;
import org.apache.logging.log4j.core.config.Configurator;
import picocli.CommandLine.Command;
import picocli.CommandLine.Model.CommandSpec;
import picocli.CommandLine.Option;
import picocli.CommandLine.Spec;

/**
 * {@code runoff demo}: the whole job on a laptop with nothing installed. Exit code 0 when the experiment
 * stopped, 1 when it did not stop within {@code --max-time-ms}, 2 for bad arguments, 130 when interrupted (Ctrl-C).
 */
@Command(name = "demo", mixinStandardHelpOptions = true,
        description = "Zero set-up demo: an in-JVM Kafka broker, the job, and a ferry operator's booking page"
                + " testing fare-table layouts with synthetic visitors, until the job decides STOP.",
        exitCodeListHeading = ExitCodes.HEADING,
        exitCodeList = {"0:the experiment stopped",
            "1:no STOP within --max-time-ms, or the demo failed",
            "2:bad arguments",
            "130:interrupted (Ctrl-C)"})
final class DemoCommand implements Callable<Integer> {

    /** Exit code after Ctrl-C. */
    static final int INTERRUPTED = 130;

    @Spec
    private CommandSpec spec;

    @Option(names = "--seed", defaultValue = "42", paramLabel = "S", description = "Seed of the synthetic visitors (default: ${DEFAULT-VALUE}).")
    private long seed;

    @Option(names = "--arms", defaultValue = "5", paramLabel = "N", description = "Layouts in play, 2 to 5 (default: ${DEFAULT-VALUE}).")
    private int arms;

    @Option(names = "--visitors", defaultValue = "3000", paramLabel = "N",
            description = "Visits per period, about a third by returning visitors: more visits, fewer periods"
                    + " (default: ${DEFAULT-VALUE}).")
    private int visitors;

    @Option(names = "--period-ms", defaultValue = "1000", paramLabel = "MS",
            description = "How often the job recomputes the weights (default: ${DEFAULT-VALUE}).")
    private long periodMs;

    @Option(names = "--delta", defaultValue = "0.05", paramLabel = "D", description = "Error probability of the stopping rule (default: ${DEFAULT-VALUE}).")
    private double delta;

    @Option(names = "--budget-trials", defaultValue = "300000", paramLabel = "TRIALS",
            description = "Trial budget: the experiment stops with reason budget there (default: ${DEFAULT-VALUE}).")
    private long budget;

    @Option(names = "--warm-up", defaultValue = "200", paramLabel = "TRIALS",
            description = "Trials per layout before the weights adapt (default: ${DEFAULT-VALUE}).")
    private long warmUp;

    @Option(names = "--max-time-ms", defaultValue = "170000", paramLabel = "MS",
            description = "Give up after this many milliseconds without a STOP (default: ${DEFAULT-VALUE}).")
    private long maxMs;

    @Option(names = "--http-port", defaultValue = "0", paramLabel = "PORT", description = "Port of the job's HTTP endpoint (default: a free port).")
    private int httpPort;

    @Option(names = "--export-decisions", paramLabel = "FILE",
            description = "Write the decision records as canonical JSON lines, for offline audit, and the run's"
                    + " public key as FILE.pub.pem (java -jar target/runoff.jar audit verify --file FILE --public-key FILE.pub.pem).")
    private Path exportDecisions;

    @Option(names = "--json", description = "JSON lines (one per period, then a summary) instead of tables.")
    private boolean json;

    @Option(names = "--verbose", description = "Keep the job's INFO and Kafka's WARN log lines (standard error);"
            + " without it the demo shows only errors.")
    private boolean verbose;

    Clock clock = Clock.systemUTC();

    @Override
    public Integer call() throws InterruptedException {
        // the demo's own shutdown hook closes the job and the broker, which still log: Log4j's hook must not
        // stop logging first (set before logging starts)
        System.setProperty(RunCommand.LOG4J_SHUTDOWN_HOOK, "false");
        DemoOptions options = new DemoOptions(seed, arms, visitors, periodMs, delta, budget, warmUp, maxMs,
                httpPort, exportDecisions, json);
        Map<String, Level> quiet = verbose ? Map.of()
                : Map.of("dev.runoff", Level.WARN, "org.apache.kafka", Level.ERROR, "kafka", Level.ERROR);
        Map<String, Level> before = new HashMap<>();
        quiet.keySet().forEach(name -> before.put(name, LogManager.getLogger(name).getLevel()));
        Optional<DemoSummary> summary;
        try {
            Configurator.setLevel(quiet);
            summary = new Demo(options, spec.commandLine().getOut(), clock).run();
        } finally {
            Configurator.setLevel(before);
        }
        if (summary.isEmpty()) {
            return INTERRUPTED;
        }
        return summary.get().stopped() ? 0 : 1;
    }
}
