package dev.runoff.topology;

import dev.runoff.testkit.TestDefinitions;

import static dev.runoff.topology.TopologyFixture.T0;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.runoff.decision.ExperimentState;
import dev.runoff.engine.stats.BernoulliStats;
import dev.runoff.records.HashChain;
import dev.runoff.records.avro.ExperimentDefinition;
import dev.runoff.records.avro.StoppingSpec;
import java.nio.charset.StandardCharsets;
import java.util.ArrayList;
import java.util.List;
import java.util.Map;
import java.util.NavigableMap;
import java.util.TreeMap;
import org.junit.jupiter.api.Test;

/** The allocation pass on plain objects: an in-memory store, a recording output and a clock that stands still. */
class AllocationPassTest {

    private final Store store = new Store();
    private final Recorder output = new Recorder();
    private final JobCounters counters = new JobCounters();

    @Test
    void aPassEvaluatesAtMostItsBudget() {
        defineAll(7);
        AllocationPass pass = pass(3);
        pass.run(T0);
        assertEquals(List.of("e0", "e1", "e2"), output.decisions);
        assertEquals(List.of("e0", "e1", "e2"), output.controls);
        assertEquals(1, counters.allocationPasses());
        assertEquals(3, counters.decisions());
        assertTrue(store.experiments.get("e3").due(), "left for the next pass");
    }

    @Test
    void successivePassesResumeWhereTheLastStoppedSoAllAreEvaluatedOnceBeforeAnyTwice() {
        int experiments = 7;
        int budget = 3;
        defineAll(experiments);
        AllocationPass pass = pass(budget);
        int passes = (experiments + budget - 1) / budget;
        for (int i = 0; i < passes; i++) {
            pass.run(T0 + i * TestDefinitions.HEARTBEAT_MS);
        }
        assertEquals(List.of("e0", "e1", "e2", "e3", "e4", "e5", "e6"), output.decisions,
                "each pass continues after the last, although the first ones are due again (heartbeat)");
        pass.run(T0 + passes * TestDefinitions.HEARTBEAT_MS);
        assertEquals(List.of("e0", "e1", "e2"), output.decisions.subList(experiments, output.decisions.size()),
                "after the last experiment the next pass starts again from the first");
    }

    @Test
    void anEvaluationThatThrowsIsRejectedAndTheOtherExperimentsOfThePassAreStillEvaluated() {
        define(TestDefinitions.bernoulli("a", "x", "y"));
        define(unevaluable("b"));
        define(TestDefinitions.bernoulli("c", "x", "y"));
        pass(10).run(T0);
        assertEquals(List.of("a", "c"), output.decisions);
        assertEquals(List.of("a", "c"), output.controls);
        assertEquals(1, output.rejections.size());
        Rejected rejected = output.rejections.get(0);
        assertEquals("b", rejected.id());
        assertEquals("evaluation-error", rejected.reason().code());
        assertTrue(rejected.body().contains("\"experimentId\":\"b\""), rejected.body());
        assertTrue(rejected.message().startsWith("evaluation: "), rejected.message());
        ExperimentState failed = store.experiments.get("b");
        assertFalse(failed.due(), "not retried before new data or the heartbeat");
        assertEquals(T0, failed.lastComputedAt());
    }

    @Test
    void aPassWhoseReadingAloneOutlastsItsTimeStillEvaluatesOneExperiment() {
        defineAll(3);
        long[] nanos = {0};
        store.onPage = () -> nanos[0] += 2_000_000L; // each read takes 2 ms, twice the pass's 1 ms
        TopologySettings settings = TopologySettings.fromMap(Map.of(TopologySettings.ALLOCATE_MAX_TIME_KEY, 1,
                TopologySettings.MONTE_CARLO_DRAWS_KEY, 100));
        AllocationPass pass = new AllocationPass(settings, store, output, counters, () -> nanos[0]);
        for (int i = 0; i < 3; i++) {
            pass.run(T0);
        }
        assertEquals(List.of("e0", "e1", "e2"), output.decisions, "one per pass: a starved pass still moves on");
    }

    @Test
    void aPassThatSpendsItsBudgetEarlyReadsNoFurtherThanOnePage() {
        defineAll(AllocationPass.PAGE + 500);
        pass(3).run(T0);
        assertEquals(3, output.decisions.size());
        assertEquals(AllocationPass.PAGE, store.read, "not the whole visit bound (10,000) for 3 evaluations");
    }

    @Test
    void aPassReadsPageByPageUpToTheEndOfTheStoreAndTheNextStartsAgainFromTheFirst() {
        int experiments = AllocationPass.PAGE + 500;
        for (int i = 0; i < experiments; i++) {
            ExperimentDefinition definition = TestDefinitions.bernoulli(String.format("e%05d", i), "x", "y");
            definition.setVersion(1L);
            store.put(definition.getExperimentId(), new ExperimentState(definition, List.of(new BernoulliStats(0, 0),
                    new BernoulliStats(0, 0)), null, 1, 1, HashChain.GENESIS, new double[] {0.5, 0.5}, -1, T0, T0,
                    false, false));
        }
        AllocationPass pass = pass(3);
        pass.run(T0 + 1);
        assertEquals(experiments, store.read, "nothing due: the whole store, in two pages");
        store.experiments.put("e00000", ExperimentState.start(store.experiments.get("e00000").definition()));
        pass.run(T0 + 1);
        assertEquals(List.of("e00000"), output.decisions, "the next pass started again from the first");
    }

    private AllocationPass pass(int budget) {
        TopologySettings settings = TopologySettings.fromMap(Map.of(
                TopologySettings.ALLOCATE_MAX_EVALUATIONS_KEY, budget, TopologySettings.MONTE_CARLO_DRAWS_KEY, 100));
        return new AllocationPass(settings, store, output, counters, () -> 0L);
    }

    private void defineAll(int count) {
        for (int i = 0; i < count; i++) {
            define(TestDefinitions.bernoulli("e" + i, "x", "y"));
        }
    }

    private void define(ExperimentDefinition definition) {
        definition.setVersion(1L);
        store.put(definition.getExperimentId(), ExperimentState.start(definition));
    }

    /**
     * A definition the stopping rule refuses (delta outside (0, 1)); validation keeps it out of the topic, so
     * it stands for any state whose evaluation throws.
     */
    private static ExperimentDefinition unevaluable(String id) {
        ExperimentDefinition definition = TestDefinitions.bernoulli(id, "x", "y");
        definition.setStopping(StoppingSpec.newBuilder(definition.getStopping()).setDelta(2.0).build());
        return definition;
    }

    /** The experiments in a sorted map, paged as the store is. */
    private static final class Store implements AllocationPass.Experiments {
        private final NavigableMap<String, ExperimentState> experiments = new TreeMap<>();
        /** Entries returned by pages so far. */
        private int read;
        /** Run at every page read. */
        private Runnable onPage = () -> { };

        @Override
        public AllocationPass.Page page(String from, int limit) {
            onPage.run();
            List<Map.Entry<String, ExperimentState>> entries = new ArrayList<>();
            String next = null;
            for (Map.Entry<String, ExperimentState> entry
                    : (from == null ? experiments : experiments.tailMap(from, true)).entrySet()) {
                if (entries.size() == limit) {
                    next = entry.getKey();
                    break;
                }
                entries.add(Map.entry(entry.getKey(), entry.getValue()));
            }
            read += entries.size();
            return new AllocationPass.Page(entries, next);
        }

        @Override
        public void put(String id, ExperimentState state) {
            experiments.put(id, state);
        }
    }

    /** A rejection as the output received it, its body decoded. */
    private record Rejected(String id, String body, RejectReason reason, String message) {
    }

    /** The ids of the records the pass sent, in order. */
    private static final class Recorder implements AllocationPass.Output {
        private final List<String> decisions = new ArrayList<>();
        private final List<String> controls = new ArrayList<>();
        private final List<Rejected> rejections = new ArrayList<>();

        @Override
        public void decision(String id, byte[] record, long timestamp) {
            decisions.add(id);
        }

        @Override
        public void control(String id, byte[] record, long timestamp) {
            controls.add(id);
        }

        @Override
        public void rejected(String id, byte[] body, long timestamp, RejectReason reason, String message) {
            rejections.add(new Rejected(id, new String(body, StandardCharsets.UTF_8), reason, message));
        }
    }
}
