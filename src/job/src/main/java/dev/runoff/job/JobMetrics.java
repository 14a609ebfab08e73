package dev.runoff.job;

import dev.runoff.topology.JobCounters;
import io.micrometer.core.instrument.FunctionCounter;
import io.micrometer.core.instrument.FunctionTimer;
import io.micrometer.core.instrument.Gauge;
import io.micrometer.core.instrument.Tags;
import io.micrometer.core.instrument.binder.jvm.JvmMemoryMetrics;
import io.micrometer.core.instrument.binder.kafka.KafkaStreamsMetrics;
import io.micrometer.prometheusmetrics.PrometheusConfig;
import io.micrometer.prometheusmetrics.PrometheusMeterRegistry;
import java.time.Duration;
import java.util.Set;
import java.util.concurrent.ConcurrentHashMap;
import java.util.concurrent.Executors;
import java.util.concurrent.ScheduledExecutorService;
import java.util.concurrent.TimeUnit;
import java.util.concurrent.atomic.LongAdder;
import org.apache.kafka.streams.KafkaStreams;

/**
 * The job's metrics in one Prometheus registry: Kafka Streams' own metrics (Micrometer's
 * {@link KafkaStreamsMetrics} binder: thread, task, processor, store and client metrics), JVM memory, and the
 * job's counters: rejected records by reason ({@code runoff_rejected_total{reason=...}}), dropped duplicates
 * ({@code runoff_duplicates_total}), outcomes that came before their unit's first trial event
 * ({@code runoff_early_outcomes_total{state="held"|"matched"}}), stream threads replaced after an uncaught exception
 * ({@code runoff_stream_thread_replacements_total}), the experiments this instance holds
 * ({@code runoff_experiments{status="running"|"stopped"}}), the running ones whose next decision is overdue
 * ({@code runoff_experiments_lagging}, see {@link Lagging}) and the client's state ({@code runoff_streams_running}).
 * Decisions sent and punctuation time come from Kafka Streams' own metrics:
 * {@code kafka_producer_topic_record_send_total{topic="runoff.decisions"}} and
 * {@code kafka_stream_thread_punctuate_latency_avg|max}.
 */
final class JobMetrics implements AutoCloseable {

    /**
     * How often the binder looks for Kafka metrics that appeared since (a topic's producer metrics appear
     * with its first record); Micrometer's default is a minute.
     */
    static final Duration REFRESH = Duration.ofSeconds(10);

    private final PrometheusMeterRegistry registry = new PrometheusMeterRegistry(PrometheusConfig.DEFAULT);
    private final JobCounters counters;
    private final LongAdder replacements = new LongAdder();
    /** Counter keys that are not rejection reasons (each has a metric of its own). */
    private static final Set<String> NOT_REJECTIONS = Set.of(JobCounters.DUPLICATE, JobCounters.EARLY_HELD,
            JobCounters.EARLY_MATCHED);

    private final Set<String> registeredReasons = ConcurrentHashMap.newKeySet();
    private final KafkaStreamsMetrics streamsMetrics;
    /** Held here: Micrometer gauges keep only a weak reference to the object they read. */
    private final ExperimentCensus census;

    /** Binds the metrics of {@code streams} and the job's {@code counters}, tagged with the application id. */
    JobMetrics(KafkaStreams streams, JobCounters counters, String applicationId) {
        this.counters = counters;
        registry.config().commonTags(Tags.of("application", applicationId)).meterFilter(new StateTagFilter());
        ScheduledExecutorService refresher = Executors.newSingleThreadScheduledExecutor(r -> {
            Thread t = new Thread(r, "runoff-metrics-refresh");
            t.setDaemon(true);
            return t;
        });
        streamsMetrics = new KafkaStreamsMetrics(streams, Tags.empty(), refresher, REFRESH);
        streamsMetrics.bindTo(registry);
        new JvmMemoryMetrics().bindTo(registry);
        FunctionCounter.builder("runoff.duplicates", counters, c -> c.count(JobCounters.DUPLICATE))
                .description("Outcome events dropped as duplicates (same experiment and event id)")
                .register(registry);
        FunctionCounter.builder("runoff.events.folded", counters, JobCounters::foldedTrials)
                .description("Trials folded into experiment statistics (exposures, or value events)")
                .register(registry);
        FunctionCounter.builder("runoff.events.placed", counters, JobCounters::inPlaceEvents).tag("path", "in-place")
                .description("Valid outcome events by the way they reached their unit's task when outcomes are keyed "
                        + "by unit: read on their unit's partition, or rerouted there through a repartition topic")
                .register(registry);
        FunctionCounter.builder("runoff.events.placed", counters, JobCounters::reroutedEvents).tag("path", "rerouted")
                .description("Valid outcome events by the way they reached their unit's task when outcomes are keyed "
                        + "by unit: read on their unit's partition, or rerouted there through a repartition topic")
                .register(registry);
        FunctionCounter.builder("runoff.early.outcomes", counters, c -> c.count(JobCounters.EARLY_HELD))
                .tag("state", "held").description("Outcome events that arrived before their unit's first trial event:"
                        + " held to wait for it, and held ones matched when it came").register(registry);
        FunctionCounter.builder("runoff.early.outcomes", counters, c -> c.count(JobCounters.EARLY_MATCHED))
                .tag("state", "matched").description("Outcome events that arrived before their unit's first trial"
                        + " event: held to wait for it, and held ones matched when it came").register(registry);
        FunctionCounter.builder("runoff.decisions", counters, JobCounters::decisions)
                .description("Decision records written").register(registry);
        FunctionTimer.builder("runoff.allocation.pass", counters, JobCounters::allocationPasses,
                        JobCounters::allocationPassNanos, TimeUnit.NANOSECONDS)
                .description("Allocation passes (punctuations that recompute weights) and their duration")
                .register(registry);
        FunctionCounter.builder("runoff.stream.thread.replacements", replacements, LongAdder::sum)
                .description("Stream threads replaced after an uncaught exception").register(registry);
        census = new ExperimentCensus(streams, System::nanoTime, System::currentTimeMillis);
        Gauge.builder("runoff.experiments", census, ExperimentCensus::running).tag("status", "running")
                .description("Experiments held by this instance, by status").register(registry);
        Gauge.builder("runoff.experiments", census, ExperimentCensus::stopped).tag("status", "stopped")
                .description("Experiments held by this instance, by status").register(registry);
        Gauge.builder("runoff.experiments.lagging", census, ExperimentCensus::lagging)
                .description("Running experiments held by this instance whose next decision is overdue by more than "
                        + "one recompute period").register(registry);
        Gauge.builder("runoff.streams.running", streams, s -> s.state() == KafkaStreams.State.RUNNING ? 1 : 0)
                .description("1 while the Kafka Streams client is RUNNING, else 0").register(registry);
    }

    /** The lagging experiments of the census's latest scan ({@code /lagging}). */
    LaggingExperiments laggingExperiments() {
        return census.laggingExperiments();
    }

    /** Counts one stream thread replaced. */
    void threadReplaced() {
        replacements.increment();
    }

    /** The metrics in Prometheus text format (registers counters for reasons seen since the last scrape). */
    String scrape() {
        for (String key : counters.snapshot().keySet()) {
            if (!NOT_REJECTIONS.contains(key) && registeredReasons.add(key)) {
                FunctionCounter.builder("runoff.rejected", counters, c -> c.count(key)).tag("reason", key)
                        .description("Records set aside on the rejected topic, by reason").register(registry);
            }
        }
        return registry.scrape();
    }

    @Override
    public void close() {
        streamsMetrics.close();
        registry.close();
    }
}
