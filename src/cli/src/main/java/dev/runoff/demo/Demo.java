package dev.runoff.demo;

import dev.runoff.job.AppSettings;
import dev.runoff.job.SafetySettings;
import dev.runoff.job.DefinitionsClient;
import dev.runoff.job.JobConfig;
import dev.runoff.job.StreamsJob;
import dev.runoff.job.TopicCreator;
import dev.runoff.job.TopicSpec;

import dev.runoff.broker.EmbeddedKafkaBroker;
import dev.runoff.engine.planning.SimulationResult;
import dev.runoff.records.CanonicalJson;
import dev.runoff.records.Format;
import dev.runoff.records.Ed25519;
import dev.runoff.records.HashChain;
import dev.runoff.records.Pem;
import dev.runoff.records.RecordSigner;
import dev.runoff.records.VerificationKey;
import dev.runoff.records.avro.AllocationUpdate;
import dev.runoff.records.avro.ArmState;
import dev.runoff.records.avro.DecisionRecord;
import dev.runoff.records.avro.ExperimentDefinition;
import java.io.IOException;
import java.io.PrintWriter;
import java.io.UncheckedIOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.security.SecureRandom;
import java.time.Clock;
import java.time.Duration;
import java.util.ArrayList;
import java.util.Comparator;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.Optional;
import java.util.stream.Stream;
import org.apache.kafka.clients.admin.Admin;
import org.apache.kafka.streams.KafkaStreams;
import org.apache.kafka.streams.StreamsConfig;

/**
 * The zero-set-up demo: an in-JVM single-node Kafka broker under a temporary directory (deleted at the end),
 * the job's topics, the job itself, the ferry scenario's experiment, and synthetic visitors drawn from the
 * weights the job publishes, period after period, until the job decides STOP (or the budget ends it).
 * Everything is closed in reverse order at the end, or by a shutdown hook on Ctrl-C.
 */
public final class Demo {

    /** Partitions of the demo's topics (two, so the job's repartitioning is exercised). */
    static final int PARTITIONS = 2;
    private static final Duration START_TIMEOUT = Duration.ofSeconds(90);
    /** How long the summary waits for an unfinished planner simulation after the STOP. */
    static final Duration SIMULATION_PATIENCE = Duration.ofSeconds(5);

    /** Id of the key pair each demo run generates. */
    static final String KEY_ID = "demo";

    private final DemoOptions options;
    private final Ed25519.Pair keys;
    private final DemoReport report;
    private final Clock clock;
    private final Closer closer = new Closer();

    /**
     * @param options the run's settings
     * @param out     where the tables (or JSON lines) go
     * @param clock   the wall clock of event timestamps and elapsed times
     */
    public Demo(DemoOptions options, PrintWriter out, Clock clock) {
        this(options, out, clock, new SecureRandom());
    }

    /**
     * A demo as above whose signing key pair (one per run) is drawn from {@code keyRandom}.
     *
     * @param keyRandom source of the run's Ed25519 key pair
     */
    public Demo(DemoOptions options, PrintWriter out, Clock clock, SecureRandom keyRandom) {
        this.keys = Ed25519.generate(KEY_ID, keyRandom);
        this.options = options;
        this.report = new DemoReport(out, options.json(), DemoReport.blocksPrintable());
        this.clock = clock;
    }

    /**
     * Runs the demo to its end and closes everything.
     *
     * @return the summary, or empty when the run was interrupted by a shutdown (Ctrl-C)
     */
    public Optional<DemoSummary> run() throws InterruptedException {
        closer.closeOnShutdown("runoff-demo-shutdown");
        try {
            return Optional.of(runOpen());
        } catch (RuntimeException | InterruptedException e) {
            // only a shutdown (Ctrl-C) closes the closer before this point: any other failure is reported
            if (closer.isClosed()) {
                return Optional.empty();
            }
            throw e;
        } finally {
            closer.close();
        }
    }

    private DemoSummary runOpen() throws InterruptedException {
        DemoScenario scenario = new DemoScenario(options.arms());
        ExperimentDefinition definition = scenario.definition(options.periodMs(), options.budget(), options.delta(),
                options.warmUp());
        DemoSimulation simulation = closer.register(DemoSimulation.start(definition, scenario.rates(),
                options.visitorsPerPeriod(), options.seed()));
        JobConfig config = startCluster();
        StreamsJob job = closer.register(StreamsJob.start(config, RecordSigner.with(keys.signing())));
        Waiting.until("the job reaching RUNNING", START_TIMEOUT, () -> {
            if (job.failed()) {
                throw new IllegalStateException("the job failed while starting (state " + job.state() + ")");
            }
            return job.state() == KafkaStreams.State.RUNNING;
        });
        report.note("job RUNNING; its HTTP endpoint: http://" + job.httpAddress() + ":" + job.httpPort() + "/experiments/"
                + DemoScenario.EXPERIMENT_ID + " (also /metrics, /health, /ready)");
        new DefinitionsClient(config, Duration.ofSeconds(30)).put(definition, Format.AVRO);
        report.note("experiment " + DemoScenario.EXPERIMENT_ID + ": a ferry operator's booking page tests "
                + scenario.layouts().size() + " fare-table layouts " + scenario.layouts()
                + "; true booking rates hidden");
        // until the job validates the experiment's events, it would reject the first visitors as unknown
        Waiting.until("the job accepting the demo experiment", START_TIMEOUT,
                () -> job.accepts(DemoScenario.EXPERIMENT_ID));
        DemoFeed feed = closer.register(new DemoFeed(config, DemoScenario.EXPERIMENT_ID, clock));
        TrafficGenerator visitors = new TrafficGenerator(DemoScenario.EXPERIMENT_ID, scenario.layouts(),
                scenario.rates(), options.seed());
        List<DecisionRecord> records = loop(feed, visitors, scenario);
        return finish(records, visitors, scenario, config, simulation.await(SIMULATION_PATIENCE).orElse(null));
    }

    private JobConfig startCluster() {
        Path dir;
        try {
            dir = Files.createTempDirectory("runoff-demo-");
        } catch (IOException e) {
            throw new UncheckedIOException("cannot create a temporary directory", e);
        }
        closer.register(() -> deleteRecursively(dir));
        report.note("starting an in-JVM Kafka broker under " + dir + " (deleted at exit) ...");
        EmbeddedKafkaBroker broker = closer.register(EmbeddedKafkaBroker.builder(dir.resolve("kafka")).build())
                .start();
        JobConfig config = JobConfig.of(demoSettings(broker.bootstrapServers(), dir.resolve("state")));
        try (Admin admin = Admin.create(config.clientProperties(JobConfig.Client.ADMIN))) {
            new TopicCreator(admin, 30_000).ensure(TopicSpec.of(config.topology()), PARTITIONS, Optional.empty());
        }
        return config;
    }

    private Map<String, String> demoSettings(String bootstrap, Path stateDir) {
        Map<String, String> s = new LinkedHashMap<>();
        s.put(StreamsConfig.BOOTSTRAP_SERVERS_CONFIG, bootstrap);
        s.put(StreamsConfig.APPLICATION_ID_CONFIG, "runoff-demo");
        s.put(StreamsConfig.STATE_DIR_CONFIG, stateDir.toString());
        s.put(StreamsConfig.NUM_STREAM_THREADS_CONFIG, "1");
        s.put(StreamsConfig.COMMIT_INTERVAL_MS_CONFIG, "100");
        s.put("runoff.flush.interval.ms", "200");
        s.put("runoff.allocate.interval.ms", "100");
        // the feed sends a batch and waits until it is counted, so the input goes quiet after every batch and
        // stream time stops there: close the windows by the wall clock once a window's length passes unread
        s.put("runoff.units.close.idle.ms", String.valueOf(DemoScenario.CONVERSION_WINDOW_MS));
        s.put(AppSettings.HTTP_PORT_KEY, String.valueOf(options.httpPort()));
        s.put(SafetySettings.BIND_ADDRESS_KEY, SafetySettings.BIND_ADDRESS);
        s.put(AppSettings.ROCKSDB_CACHE_KEY, String.valueOf(16L << 20));
        s.put(AppSettings.MEMTABLE_KEY, String.valueOf(4L << 20));
        return s;
    }

    /**
     * Sends one batch of visitors drawn from the weights of the latest decision, then reads decisions until the
     * job has counted every visitor sent, so that each batch follows the weights in force when it was served
     * and is folded before the next one is drawn (the audit's sample-ratio check relies on it).
     */
    private List<DecisionRecord> loop(DemoFeed feed, TrafficGenerator visitors, DemoScenario scenario)
            throws InterruptedException {
        AllocationUpdate control = feed.awaitControl(START_TIMEOUT);
        long began = clock.millis();
        long deadline = began + options.maxMs();
        Duration wait = Duration.ofMillis(options.periodMs() * 3 + 5_000);
        List<DecisionRecord> records = new ArrayList<>();
        while (clock.millis() < deadline) {
            long decided = records.isEmpty() ? 0 : records.get(records.size() - 1).getSequence();
            control = Optional.ofNullable(feed.awaitControl(decided, wait)).orElse(control);
            feed.send(visitors.next(options.visitorsPerPeriod(), DemoFeed.weights(control, scenario.layouts()),
                    clock.millis()));
            while (clock.millis() < deadline) {
                DecisionRecord d = feed.nextDecision(wait);
                if (d == null) {
                    break;
                }
                records.add(d);
                report.period(records.size(), clock.millis() - began, d);
                if ("STOP".equals(d.getDecision().name())) {
                    return records;
                }
                if (counted(d) >= visitors.visitors()) {
                    break;
                }
            }
        }
        return records;
    }

    private static long counted(DecisionRecord d) {
        return d.getArms().stream().mapToLong(ArmState::getTrials).sum();
    }

    private DemoSummary finish(List<DecisionRecord> records, TrafficGenerator visitors, DemoScenario scenario,
                               JobConfig config, SimulationResult simulated) {
        DecisionRecord last = records.isEmpty() ? null : records.get(records.size() - 1);
        long elapsed = last == null ? 0 : last.getStreamTime() - records.get(0).getStreamTime();
        boolean intact = HashChain.firstBreak(records).isEmpty();
        Path exported = options.exportDecisions();
        if (exported != null) {
            export(records, exported);
            Path publicKey = publicKeyFile(exported);
            writePublicKey(keys.verification(), publicKey);
            report.note("decision records signed with this run's key '" + KEY_ID + "'; check them with: java -jar target/runoff.jar audit "
                    + "verify --file " + exported + " --public-key " + publicKey);
        }
        double[] predicted = DemoSummary.predictions(scenario.rates(), options.delta());
        DemoSummary summary = new DemoSummary(last, records.size(), elapsed, visitors.visitors(), scenario.trueBest(),
                scenario.rates(), predicted[0], predicted[1], predicted[2], simulated, intact, config.topology().decisionsTopic(),
                exported);
        report.summary(summary, options);
        report.note("shutting down: job, broker, temporary directory ...");
        return summary;
    }

    /** Where the public key of an export to {@code file} goes: {@code FILE.pub.pem}. */
    public static Path publicKeyFile(Path file) {
        return file.resolveSibling(file.getFileName() + ".pub.pem");
    }

    private static void writePublicKey(VerificationKey key, Path file) {
        try {
            Files.writeString(file, Pem.write(key), StandardCharsets.US_ASCII);
        } catch (IOException e) {
            throw new UncheckedIOException("cannot write " + file + ": " + e.getMessage(), e);
        }
    }

    /** Writes {@code records} to {@code file} as canonical JSON, one per line. */
    static void export(List<DecisionRecord> records, Path file) {
        List<String> lines = records.stream().map(CanonicalJson::of).toList();
        try {
            Files.write(file, lines, StandardCharsets.UTF_8);
        } catch (IOException e) {
            throw new UncheckedIOException("cannot write " + file + ": " + e.getMessage(), e);
        }
    }

    private static void deleteRecursively(Path dir) throws IOException {
        if (!Files.exists(dir)) {
            return;
        }
        try (Stream<Path> paths = Files.walk(dir)) {
            for (Path p : paths.sorted(Comparator.reverseOrder()).toList()) {
                Files.deleteIfExists(p);
            }
        }
    }
}
