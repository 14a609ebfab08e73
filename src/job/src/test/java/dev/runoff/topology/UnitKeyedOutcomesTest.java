package dev.runoff.topology;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.runoff.engine.stats.ArmStats;
import dev.runoff.engine.stats.BernoulliStats;
import dev.runoff.testkit.TestDefinitions;
import java.util.HashMap;
import java.util.List;
import java.util.Map;
import java.util.Set;
import java.util.function.Consumer;
import java.util.stream.Collectors;
import org.apache.kafka.common.serialization.Serdes;
import org.apache.kafka.streams.TopologyDescription;
import org.junit.jupiter.api.Test;

/**
 * The job with {@code runoff.outcomes.keyed.by.unit=true} under {@link org.apache.kafka.streams.TopologyTestDriver}
 * (one partition: the partition count is learned from the first rerouted event, so the first event takes the
 * repartition and the later ones stay in place), against the same input through the job as configured by
 * default; and the shape of both topologies.
 */
class UnitKeyedOutcomesTest {

    private static final long WINDOW = 1_000;
    private static final TopologySettings BY_UNIT = withByUnit(TopologyFixture.SETTINGS);

    private static TopologySettings withByUnit(TopologySettings base) {
        Map<String, Object> config = new HashMap<>(Map.of(TopologySettings.FLUSH_INTERVAL_KEY, base.flushIntervalMs(),
                TopologySettings.ALLOCATE_INTERVAL_KEY, base.allocateIntervalMs(),
                TopologySettings.DEDUPE_WINDOW_KEY, base.dedupeWindowMs(),
                TopologySettings.UNITS_CLOSE_IDLE_KEY, base.unitsCloseIdleMs()));
        config.put(TopologySettings.OUTCOMES_KEYED_BY_UNIT_KEY, "true");
        return TopologySettings.fromMap(config);
    }

    @Test
    void aUnitWhoseEventsComeBothWaysCountsOnceAndAsWithoutTheSetting() {
        Consumer<TopologyFixture> input = job -> {
            job.define(TestDefinitions.withWindow(TestDefinitions.bernoulli("hero", "a", "b"), WINDOW));
            long t = job.clock();
            job.event("u1", Events.exposure("hero", "u1", "x1", "a", t));
            job.event("u1", Events.exposure("hero", "u1", "x1", "a", t));
            job.event("c1", Events.click("hero", "u1", "c1", null, t + 10));
            job.event("u1", Events.click("hero", "u1", "c1", null, t + 10));
            job.event("u2", Events.exposure("hero", "u2", "y1", "b", t));
            job.event(null, Events.exposure("hero", "u3", "z1", "b", t));
            job.event("u3", Events.click("hero", "u3", "z2", "a", t + 20));
            job.advance(WINDOW + TestDefinitions.RECOMPUTE_MS);
        };
        List<ArmStats> expected = List.of(new BernoulliStats(1, 1), new BernoulliStats(2, 0));
        try (TopologyFixture byUnit = new TopologyFixture(BY_UNIT);
             TopologyFixture asToday = new TopologyFixture()) {
            input.accept(byUnit);
            input.accept(asToday);
            assertEquals(expected, asToday.state("hero").stats(), "u1: one trial, one success; u2, u3: one trial");
            assertEquals(expected, byUnit.state("hero").stats(), "the same counts whichever way the events came");
            List<String> rejected = reasons(byUnit);
            assertEquals(List.of("arm-mismatch"), rejected, "u3's click names another arm");
            assertEquals(reasons(asToday), rejected);
            JobCounters counters = byUnit.counters();
            assertEquals(2, counters.count(JobCounters.DUPLICATE), "x1 and c1 again, each on the other path");
            assertEquals(1, counters.reroutedEvents(), "the first event, before the partition count is known");
            assertEquals(6, counters.inPlaceEvents());
            assertEquals(0, asToday.counters().inPlaceEvents() + asToday.counters().reroutedEvents(),
                    "without the setting nothing is placed");
        }
    }

    @Test
    void anEventKeyedOtherwiseIsReroutedAndCounted() {
        try (TopologyFixture job = new TopologyFixture(BY_UNIT)) {
            job.define(TestDefinitions.withWindow(TestDefinitions.bernoulli("hero", "a", "b"), WINDOW));
            long t = job.clock();
            job.event("not-the-unit", Events.exposure("hero", "u9", "x9", "b", t));
            job.advance(WINDOW + TestDefinitions.RECOMPUTE_MS);
            assertEquals(List.of(BernoulliStats.EMPTY, new BernoulliStats(1, 0)), job.state("hero").stats());
            assertEquals(1, job.counters().reroutedEvents());
            assertEquals(0, job.counters().inPlaceEvents());
        }
    }

    @Test
    void theOutcomesAndTheReroutedEventsAreReadByTheSameTasks() {
        // Kafka Streams makes one task per partition number of a sub-topology, reading that partition of each
        // of its source topics (the experiments topic joins this one through the merge before the
        // by-experiment repartition, with or without the setting).
        Map<String, Set<String>> byUnit = sourcesBySubtopology(BY_UNIT, "runoff-by-unit");
        assertTrue(byUnit.values().contains(Set.of(BY_UNIT.outcomesTopic(), BY_UNIT.definitionsTopic(),
                "runoff-by-unit-events-to-unit-repartition")), byUnit.toString());
        assertFalse(byUnit.values().stream().anyMatch(s -> s.stream().anyMatch(t -> t.contains("events-by-unit"))));

        TopologySettings defaults = TopologyFixture.SETTINGS;
        Map<String, Set<String>> today = sourcesBySubtopology(defaults, "runoff-today");
        assertTrue(today.values().contains(Set.of(defaults.outcomesTopic())), today.toString());
        assertTrue(today.values().contains(Set.of(defaults.definitionsTopic(), "runoff-today-events-by-unit-repartition")),
                "without the setting every event takes the events-by-unit repartition, as before: " + today);
    }

    private static Map<String, Set<String>> sourcesBySubtopology(TopologySettings settings, String application) {
        JobCounters counters = new JobCounters();
        TopologyDescription description = RunoffTopology.build(settings,
                TopologyFixture.driverConfig(settings, counters, application), counters).describe();
        return description.subtopologies().stream().collect(Collectors.toMap(s -> String.valueOf(s.id()),
                s -> s.nodes().stream().filter(n -> n instanceof TopologyDescription.Source)
                        .flatMap(n -> ((TopologyDescription.Source) n).topicSet().stream())
                        .map(t -> t.startsWith("events-") ? application + "-" + t : t)
                        .collect(Collectors.toSet())));
    }

    private static List<String> reasons(TopologyFixture job) {
        return job.rejected().stream().map(r -> TopologyFixture.header(r, Rejections.REASON_HEADER)).toList();
    }
}
