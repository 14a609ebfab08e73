package dev.runoff.demo;

import dev.runoff.job.AppSettings;
import dev.runoff.job.SafetySettings;
import dev.runoff.job.DefinitionsClient;
import dev.runoff.job.JobConfig;
import dev.runoff.job.StreamsJob;
import dev.runoff.job.TopicCreator;
import dev.runoff.job.TopicSpec;

import dev.runoff.broker.EmbeddedKafkaBroker;
import dev.runoff.client.UnitPseudonymizer;
import dev.runoff.engine.planning.SimulationResult;
import dev.runoff.records.CanonicalJson;
import dev.runoff.records.Format;
import dev.runoff.records.Ed25519;
import dev.runoff.records.HashChain;
import dev.runoff.records.Pem;
import dev.runoff.records.RecordSigner;
import dev.runoff.records.VerificationKey;
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
import org.apache.commons.rng.simple.RandomSource;
import org.apache.kafka.clients.admin.Admin;
import org.apache.kafka.streams.KafkaStreams;
import org.apache.kafka.streams.StreamsConfig;

/**
 * The zero-set-up demo: an in-JVM single-node Kafka broker under a temporary directory (deleted at the end),
 * the job's topics, the job itself, the ferry scenario's experiment, and synthetic visitors (a third of them
 * returning) served through the client library from the weights the job publishes, with bookings that come
 * after a delay, until the job decides STOP (or the budget ends it).
 * Everything is closed in reverse order at the end, or by a shutdown hook on Ctrl-C.
 */
public final class Demo {

    /** Partitions of the demo's topics (two, so the job's repartitioning is exercised). */
    static final int PARTITIONS = 2;
    private static final Duration START_TIMEOUT = Duration.ofSeconds(90);
    /** Slices of visits per recompute period: visitors arrive spread over time, not in one burst. */
    static final int SLICES = 10;
    /** The job's application id, also its consumer group. */
    private static final String APPLICATION_ID = "runoff-demo";
    /** How far, in slices of visits, the job may fall behind its input before the visitors pause. */
    private static final long LAG_SLICES = 2;
    /** Longest wait for a decision between two sends of due bookings. */
    private static final long DECISION_POLL_MS = 20;
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
        DemoSimulation simulation = closer.register(DemoSimulation.start(definition, scenario.countedRates(),
                (int) options.newVisitorsPerPeriod(), options.seed()));
        JobConfig config = startCluster();
        StreamsJob job = closer.register(StreamsJob.start(config, RecordSigner.with(keys.signing())));
        Waiting.until("the job reaching RUNNING", START_TIMEOUT, () -> {
            if (job.failed()) {
                throw new IllegalStateException("the job failed while starting (state " + job.state() + ")");
            }
            return job.state() == KafkaStreams.State.RUNNING;
        });
        String endpoint = "http://" + job.httpAddress() + ":" + job.httpPort();
        report.note("job RUNNING; watch it in a browser: " + endpoint + "/experiments/" + DemoScenario.EXPERIMENT_ID
                + "?refresh=5 (every experiment: " + endpoint + "/; the same address gives other clients JSON; also"
                + " /metrics, /health, /ready)");
        new DefinitionsClient(config, Duration.ofSeconds(30)).put(definition, Format.AVRO);
        report.note("experiment " + DemoScenario.EXPERIMENT_ID + ": a ferry operator's booking page tests "
                + scenario.layouts().size() + " fare-table layouts " + scenario.layouts()
                + "; true booking rates hidden; a third of the visits are by returning visitors, served through the"
                + " client library (sticky layouts); bookings come after a delay, counted within a "
                + DemoScenario.CONVERSION_WINDOW_MS + " ms window");
        // until the job validates the experiment's events, it would reject the first visitors as unknown
        Waiting.until("the job accepting the demo experiment", START_TIMEOUT,
                () -> job.accepts(DemoScenario.EXPERIMENT_ID));
        DemoFeed feed = closer.register(new DemoFeed(config, DemoScenario.EXPERIMENT_ID, clock));
        TrafficGenerator visitors = new TrafficGenerator(scenario.rates(), DemoScenario.RETURNING_SHARE,
                DemoScenario.BOOKING_DELAY_MEAN_MS, scenario.failedPaymentRates(), DemoScenario.FAILURE_DELAY_MEAN_MS,
                options.seed());
        DemoServingTier serving = closer.register(new DemoServingTier(config, DemoScenario.EXPERIMENT_ID,
                scenario.layouts(), visitors, clock, pseudonymKey(options.seed())));
        Waiting.until("weights for " + DemoScenario.EXPERIMENT_ID + " in the serving tier's table", START_TIMEOUT,
                serving::ready);
        JobLag lag = closer.register(new JobLag(config, APPLICATION_ID));
        List<DecisionRecord> records = loop(feed, serving, lag);
        return finish(records, visitors, serving, scenario, config, simulation.await(SIMULATION_PATIENCE).orElse(null));
    }

    /** The key of the demo's unit pseudonyms, drawn from the run's seed. */
    private static byte[] pseudonymKey(long seed) {
        byte[] key = new byte[UnitPseudonymizer.MIN_KEY_BYTES];
        RandomSource.SPLIT_MIX_64.create(seed).nextBytes(key);
        return key;
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
        s.put(StreamsConfig.APPLICATION_ID_CONFIG, APPLICATION_ID);
        s.put(StreamsConfig.STATE_DIR_CONFIG, stateDir.toString());
        s.put(StreamsConfig.NUM_STREAM_THREADS_CONFIG, "1");
        s.put(StreamsConfig.COMMIT_INTERVAL_MS_CONFIG, "100");
        s.put("runoff.flush.interval.ms", "200");
        s.put("runoff.allocate.interval.ms", "100");
        // visitors pause while the job lags and stop at the end, so the input goes quiet and stream time stops
        // there: close the windows by the wall clock once a second passes unread (the default is 5 s)
        s.put("runoff.units.close.idle.ms", "1000");
        s.put(AppSettings.HTTP_PORT_KEY, String.valueOf(options.httpPort()));
        s.put(SafetySettings.BIND_ADDRESS_KEY, SafetySettings.BIND_ADDRESS);
        s.put(AppSettings.ROCKSDB_CACHE_KEY, String.valueOf(16L << 20));
        s.put(AppSettings.MEMTABLE_KEY, String.valueOf(4L << 20));
        return s;
    }

    /**
     * Serves the visits spread over time, {@link #SLICES} slices per recompute period, sends each booking when
     * its delay has passed, and reads the decisions as they come, until a STOP or the time limit. Serving does
     * not wait for decisions: visits follow whatever weights the serving tier's table holds, as in production,
     * so at any decision the latest visitors are still pending (their booking windows open). Only when the job's
     * consumers fall behind their input by more than {@link #LAG_SLICES} slices of visits (a loaded machine) do
     * the visitors pause until it catches up: the job closes booking windows on its wall clock, so a backlog
     * longer than the window would turn bookings made in time into {@code late-outcome} rejections.
     */
    private List<DecisionRecord> loop(DemoFeed feed, DemoServingTier serving, JobLag lag)
            throws InterruptedException {
        long began = clock.millis();
        long deadline = began + options.maxMs();
        long sliceMs = options.periodMs() / SLICES;
        long allowance = LAG_SLICES * options.visitsPerPeriod() / SLICES;
        List<DecisionRecord> records = new ArrayList<>();
        long nextSlice = began;
        long slice = 0;
        while (clock.millis() < deadline) {
            long now = clock.millis();
            if (now >= nextSlice) {
                if (lag.records() <= allowance) {
                    slice++;
                    serving.serve((int) (options.visitsPerPeriod() * slice / SLICES
                            - options.visitsPerPeriod() * (slice - 1) / SLICES));
                }
                nextSlice = Math.max(nextSlice + sliceMs, now);
            }
            serving.sendDue();
            DecisionRecord d = feed.nextDecision(Duration.ofMillis(Math.max(1, Math.min(DECISION_POLL_MS,
                    nextSlice - clock.millis()))));
            if (d != null) {
                records.add(d);
                report.period(records.size(), clock.millis() - began, d);
                if ("STOP".equals(d.getDecision().name())) {
                    return records;
                }
            }
        }
        return records;
    }

    private DemoSummary finish(List<DecisionRecord> records, TrafficGenerator visitors, DemoServingTier serving,
                               DemoScenario scenario, JobConfig config, SimulationResult simulated) {
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
        double[] predicted = DemoSummary.predictions(scenario.countedRates(), options.delta());
        DemoSummary.Traffic traffic = new DemoSummary.Traffic(visitors.visitors(), visitors.visits(),
                visitors.returningVisits(), serving.switchedWhileWeighted(), serving.keptPicks(),
                serving.bookingsSent());
        DemoSummary summary = new DemoSummary(last, records.size(), elapsed, traffic, scenario.trueBest(),
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
