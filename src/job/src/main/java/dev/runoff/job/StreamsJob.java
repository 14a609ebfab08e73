package dev.runoff.job;

import dev.runoff.job.pages.DecisionFeed;
import dev.runoff.job.pages.DecisionHistory;
import dev.runoff.job.pages.Pages;
import dev.runoff.records.RecordSigner;
import dev.runoff.topology.JobCounters;
import dev.runoff.topology.RunoffTopology;
import java.time.Duration;
import java.util.Properties;
import java.util.concurrent.CountDownLatch;
import java.util.concurrent.TimeUnit;
import java.util.concurrent.atomic.AtomicBoolean;
import java.util.concurrent.atomic.AtomicReference;
import org.apache.kafka.streams.KafkaStreams;
import org.apache.kafka.streams.StoreQueryParameters;
import org.apache.kafka.streams.StreamsConfig;
import org.apache.kafka.streams.Topology;
import org.apache.kafka.streams.errors.InvalidStateStoreException;
import org.apache.kafka.streams.state.HostInfo;
import org.apache.kafka.streams.state.QueryableStoreTypes;
import org.apache.kafka.streams.state.ReadOnlyKeyValueStore;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;

/**
 * The running job: the topology in a Kafka Streams client, the HTTP endpoint with its pages (fed by a
 * reader of the decisions topic) and the metrics. A stream
 * thread that dies of an uncaught exception is logged and replaced; {@link #close()} (from a shutdown hook
 * on SIGTERM, say) stops the client within the configured timeout, then the endpoint.
 */
public final class StreamsJob implements AutoCloseable {

    private static final Logger LOG = LoggerFactory.getLogger(StreamsJob.class);

    private final JobConfig config;
    private final JobCounters counters;
    private final KafkaStreams streams;
    private final JobMetrics metrics;
    private final StatusServer http;
    private final DecisionFeed feed;
    private final CountDownLatch ended = new CountDownLatch(1);
    private final AtomicBoolean closed = new AtomicBoolean();
    private volatile boolean failed;
    private final AtomicReference<String> cause;

    private StreamsJob(JobConfig config, JobCounters counters, KafkaStreams streams, JobMetrics metrics,
                       StatusServer http, DecisionFeed feed, AtomicReference<String> cause) {
        this.feed = feed;
        this.config = config;
        this.cause = cause;
        this.counters = counters;
        this.streams = streams;
        this.metrics = metrics;
        this.http = http;
    }

    /**
     * Builds the topology for {@code config}, starts the HTTP endpoint, then the Kafka Streams client (which
     * connects in the background: see {@code /ready}).
     */
    public static StreamsJob start(JobConfig config) {
        return start(config, config.signing().signer());
    }

    /**
     * As {@link #start(JobConfig)}, signing the decision and control records with {@code signer} (which
     * {@link SigningSettings#signer()} reads from the configuration).
     */
    public static StreamsJob start(JobConfig config, RecordSigner signer) {
        JobCounters counters = new JobCounters();
        Properties props = RunoffTopology.streamsConfig(config.topology(), counters, config.streamsOverrides());
        props.put(StreamsConfig.producerPrefix(RunoffTopology.COUNTERS_CONFIG), counters);
        Topology topology = RunoffTopology.build(config.topology(), props, counters, System::nanoTime, signer);
        KafkaStreams streams = new KafkaStreams(topology, props);
        JobMetrics metrics = new JobMetrics(streams, counters, config.applicationId());
        AtomicReference<String> cause = new AtomicReference<>();
        SafetySettings safety = config.safety();
        StatusServer http;
        DecisionHistory history = new DecisionHistory();
        Pages pages = new Pages(history, config.topology().decisionsTopic());
        try {
            http = StatusServer.start(safety.httpBindAddress(), config.app().httpPort(), safety.httpToken(),
                    backend(streams, metrics, self(config), cause, pages));
        } catch (RuntimeException e) {
            metrics.close();
            streams.close(Duration.ZERO);
            throw e;
        }
        DecisionFeed feed = DecisionFeed.start(config.clientProperties(JobConfig.Client.CONSUMER),
                config.topology().decisionsTopic(), history);
        StreamsJob job = new StreamsJob(config, counters, streams, metrics, http, feed, cause);
        streams.setUncaughtExceptionHandler(new ReplaceThreadHandler(safety.maxThreadReplacements(),
                safety.replacementWindowMs(), System::currentTimeMillis, metrics::threadReplaced,
                c -> cause.compareAndSet(null, c)));
        streams.setStateListener(job::stateChanged);
        streams.setGlobalStateRestoreListener(new RestoreLog(System::nanoTime));
        LOG.info("event=job-starting application.id={} bootstrap.servers={} http={}:{} http.token={} signing.key.id={}"
                + " topics={}", config.applicationId(), config.bootstrapServers(), safety.httpBindAddress(), http.port(),
                safety.httpToken().isPresent() ? "required" : "none",
                signer.signs() ? signer.keyId() : "none (records unsigned: runoff.signing.required=false)",
                config.topology());
        if (SafetySettings.atLeastOnce(config.kafka())) {
            LOG.warn("event=at-least-once processing.guarantee=at_least_once ({}=true): after a crash events may "
                    + "be counted twice and a decision chain may repeat a sequence; the documented guarantees "
                    + "assume exactly_once_v2", SafetySettings.AT_LEAST_ONCE_KEY);
        }
        config.ignored().forEach(v -> LOG.warn("event=env-ignored variable={}", v));
        streams.start();
        return job;
    }

    private static HostInfo self(JobConfig config) {
        String server = config.kafka().get(StreamsConfig.APPLICATION_SERVER_CONFIG);
        return server == null || server.isEmpty() ? null : HostInfo.buildFromEndpoint(server);
    }

    private static StatusServer.Backend backend(KafkaStreams streams, JobMetrics metrics, HostInfo self,
                                                AtomicReference<String> cause, Pages pages) {
        ExperimentLookup lookup = new ExperimentLookup(streams, self);
        return new StatusServer.Backend() {
            @Override
            public KafkaStreams.State state() {
                return streams.state();
            }

            @Override
            public String metrics() {
                return metrics.scrape();
            }

            @Override
            public Lookup experiment(String id) {
                return lookup.find(id);
            }

            @Override
            public String failure() {
                return cause.get();
            }

            @Override
            public Pages pages() {
                return pages;
            }

            @Override
            public LaggingExperiments lagging() {
                return metrics.laggingExperiments();
            }
        };
    }

    private void stateChanged(KafkaStreams.State now, KafkaStreams.State before) {
        LOG.info("event=streams-state from={} to={}", before, now);
        if (now == KafkaStreams.State.ERROR) {
            failed = true;
            LOG.error("event=streams-failed state=ERROR cause=\"{}\": the Kafka Streams client stopped; the job ends",
                    cause.get());
            ended.countDown();
        } else if (now == KafkaStreams.State.NOT_RUNNING) {
            ended.countDown();
        }
    }

    /** State of the Kafka Streams client. */
    public KafkaStreams.State state() {
        return streams.state();
    }

    /** The address the HTTP endpoint listens on, e.g. {@code 127.0.0.1}. */
    public String httpAddress() {
        return http.address();
    }

    /** Port of the HTTP endpoint. */
    public int httpPort() {
        return http.port();
    }

    /**
     * Whether this instance validates events of {@code experimentId} already: its definition has reached
     * the instance's global store of accepted definitions. Until then the job rejects the experiment's events
     * as unknown, so a producer that starts traffic right after publishing a definition should wait for this
     * (or for the first control record plus the global store's lag).
     */
    public boolean accepts(String experimentId) {
        if (streams.state() != KafkaStreams.State.RUNNING) {
            return false;
        }
        try {
            ReadOnlyKeyValueStore<String, byte[]> store = streams.store(StoreQueryParameters.fromNameAndType(
                    RunoffTopology.DEFINITIONS_STORE, QueryableStoreTypes.<String, byte[]>keyValueStore()));
            return store.get(experimentId) != null;
        } catch (InvalidStateStoreException e) {
            return false;
        }
    }

    /** The counters the topology fills. */
    public JobCounters counters() {
        return counters;
    }

    /** The configuration the job runs with. */
    public JobConfig config() {
        return config;
    }

    /** Why the job gave up (thread replacements exhausted), or {@code null}. */
    public String failureCause() {
        return cause.get();
    }

    /** Whether the Kafka Streams client ended in ERROR. */
    public boolean failed() {
        return failed;
    }

    /** Waits until the client stops (closed, or failed) or {@code timeout} passes; true if it stopped. */
    public boolean awaitStop(Duration timeout) throws InterruptedException {
        return ended.await(timeout.toMillis(), TimeUnit.MILLISECONDS);
    }

    /**
     * Stops the job: the Kafka Streams client (committing and closing its tasks, at most the configured
     * shutdown timeout), the metrics, then the HTTP endpoint. Only the first call does anything.
     */
    @Override
    public void close() {
        if (!closed.compareAndSet(false, true)) {
            return;
        }
        long began = System.nanoTime();
        boolean clean = streams.close(Duration.ofMillis(config.app().shutdownTimeoutMs()));
        metrics.close();
        feed.close();
        http.close();
        ended.countDown();
        LOG.info("event=job-stopped clean={} millis={}", clean, (System.nanoTime() - began) / 1_000_000);
    }
}
