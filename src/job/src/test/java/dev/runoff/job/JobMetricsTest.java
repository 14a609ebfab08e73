package dev.runoff.job;

import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.runoff.topology.JobCounters;
import dev.runoff.topology.RunoffTopology;
import dev.runoff.topology.TopologySettings;
import java.nio.file.Path;
import java.util.Map;
import java.util.Properties;
import java.util.UUID;
import java.util.function.Consumer;
import org.apache.kafka.streams.KafkaStreams;
import org.apache.kafka.streams.StreamsConfig;
import org.junit.jupiter.api.Test;

/** The job's own counters in the Prometheus scrape (a Kafka Streams client built, never started). */
class JobMetricsTest {

    @Test
    void placedEventsAreCountedByPath() {
        String scrape = scrape(Map.of(TopologySettings.OUTCOMES_KEYED_BY_UNIT_KEY, "true"), counters -> {
            counters.inPlace();
            counters.inPlace();
            counters.rerouted();
        });
        assertTrue(scrape.contains("runoff_events_placed_total{application=\"metrics-test\",path=\"in-place\"} 2.0"),
                scrape.lines().filter(l -> l.contains("placed")).toList().toString());
        assertTrue(scrape.contains("runoff_events_placed_total{application=\"metrics-test\",path=\"rerouted\"} 1.0"));
    }

    @Test
    void earlyOutcomesHaveTheirOwnCounterAndAreNotRejections() {
        String scrape = scrape(Map.of(), counters -> {
            counters.earlyHeld();
            counters.earlyHeld();
            counters.earlyMatched();
            counters.duplicate();
            counters.rejected("unattributed");
        });
        assertTrue(scrape.contains("runoff_early_outcomes_total{application=\"metrics-test\",state=\"held\"} 2.0"),
                scrape.lines().filter(l -> l.contains("early")).toList().toString());
        assertTrue(scrape.contains("runoff_early_outcomes_total{application=\"metrics-test\",state=\"matched\"} 1.0"));
        assertTrue(scrape.contains("runoff_rejected_total{application=\"metrics-test\",reason=\"unattributed\"} 1.0"));
        assertFalse(scrape.lines().anyMatch(l -> l.startsWith("runoff_rejected_total")
                && (l.contains("early") || l.contains("duplicate"))), scrape.lines()
                .filter(l -> l.startsWith("runoff_rejected_total")).toList().toString());
    }

    /** The scrape of a job built with {@code config} after {@code count} has counted. */
    private static String scrape(Map<String, ?> config, Consumer<JobCounters> count) {
        TopologySettings settings = TopologySettings.fromMap(config);
        JobCounters counters = new JobCounters();
        Properties props = RunoffTopology.streamsConfig(settings, counters, Map.of(
                StreamsConfig.APPLICATION_ID_CONFIG, "metrics-test",
                StreamsConfig.BOOTSTRAP_SERVERS_CONFIG, "localhost:1",
                StreamsConfig.STATE_DIR_CONFIG, Path.of("target", "metrics-state", UUID.randomUUID().toString())
                        .toString()));
        try (KafkaStreams streams = new KafkaStreams(RunoffTopology.build(settings, props, counters), props);
             JobMetrics metrics = new JobMetrics(streams, counters, "metrics-test")) {
            count.accept(counters);
            return metrics.scrape();
        }
    }
}
