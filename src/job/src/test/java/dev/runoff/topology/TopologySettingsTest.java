package dev.runoff.topology;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;

import dev.runoff.records.Format;
import java.util.Map;
import org.junit.jupiter.api.Test;

class TopologySettingsTest {

    @Test
    void defaultsAreTheDocumentedOnes() {
        TopologySettings s = TopologySettings.defaults();
        assertEquals("runoff.outcomes", s.outcomesTopic());
        assertEquals("runoff.experiments", s.definitionsTopic());
        assertEquals("runoff.experiments.accepted", s.acceptedDefinitionsTopic());
        assertEquals("runoff.allocations", s.allocationsTopic());
        assertEquals("runoff.decisions", s.decisionsTopic());
        assertEquals("runoff.rejected", s.rejectedTopic());
        assertEquals(86_400_000L, s.dedupeWindowMs());
        assertEquals(2_000L, s.flushIntervalMs());
        assertEquals(1_000L, s.allocateIntervalMs());
        assertEquals(200, s.allocateMaxEvaluations());
        assertEquals(5_000L, s.unitsCloseIdleMs());
        assertEquals(Format.AVRO, s.outputFormat());
        assertEquals(false, s.outcomesKeyedByUnit());
    }

    @Test
    void outcomesKeyedByUnitIsTrueOrFalseInAnyCase() {
        assertEquals(true, TopologySettings.fromMap(Map.of(TopologySettings.OUTCOMES_KEYED_BY_UNIT_KEY, " TRUE "))
                .outcomesKeyedByUnit());
        assertEquals(false, TopologySettings.fromMap(Map.of(TopologySettings.OUTCOMES_KEYED_BY_UNIT_KEY, "false"))
                .outcomesKeyedByUnit());
        assertMessage("runoff.outcomes.keyed.by.unit must be true or false, got 'yes'",
                Map.of(TopologySettings.OUTCOMES_KEYED_BY_UNIT_KEY, "yes"));
        assertMessage("runoff.outcomes.keyed.by.unit must be true or false, got ''",
                Map.of(TopologySettings.OUTCOMES_KEYED_BY_UNIT_KEY, ""));
    }

    @Test
    void valuesAreReadFromStringsAndNumbers() {
        TopologySettings s = TopologySettings.fromMap(Map.of(TopologySettings.FLUSH_INTERVAL_KEY, " 500 ",
                TopologySettings.ALLOCATE_MAX_EVALUATIONS_KEY, 7, TopologySettings.OUTPUT_FORMAT_KEY, "json",
                "application.id", "ignored: not a runoff key"));
        assertEquals(500, s.flushIntervalMs());
        assertEquals(7, s.allocateMaxEvaluations());
        assertEquals(Format.JSON, s.outputFormat());
    }

    @Test
    void misspeltKeyIsAnErrorNamingIt() {
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class,
                () -> TopologySettings.fromMap(Map.of("runoff.flush.intervall.ms", "5")));
        assertEquals(true, e.getMessage().startsWith("unknown setting runoff.flush.intervall.ms"), e.getMessage());
    }

    @Test
    void badValuesAreErrorsNamingKeyAndValue() {
        assertMessage("runoff.dedupe.window.ms must be a whole number, got 'a day'",
                Map.of(TopologySettings.DEDUPE_WINDOW_KEY, "a day"));
        assertMessage("runoff.flush.interval.ms must be >= 1, got 0", Map.of(TopologySettings.FLUSH_INTERVAL_KEY, 0));
        assertMessage("runoff.units.close.idle.ms must be >= 1, got 0",
                Map.of(TopologySettings.UNITS_CLOSE_IDLE_KEY, 0));
        assertMessage("runoff.output.format must be AVRO or JSON, got 'xml'",
                Map.of(TopologySettings.OUTPUT_FORMAT_KEY, "xml"));
        assertMessage("runoff.allocate.max.visits must be at most 2147483647, got 3000000000",
                Map.of(TopologySettings.ALLOCATE_MAX_VISITS_KEY, 3_000_000_000L));
        assertMessage("runoff.topic.decisions = 'runoff.allocations' is already used by another runoff.topic.* "
                + "setting; every topic must differ",
                Map.of(TopologySettings.DECISIONS_TOPIC_KEY, "runoff.allocations"));
        assertMessage("runoff.topic.rejected must name a topic, got ''",
                Map.of(TopologySettings.REJECTED_TOPIC_KEY, " "));
    }

    private static void assertMessage(String expected, Map<String, ?> config) {
        assertEquals(expected, assertThrows(IllegalArgumentException.class, () -> TopologySettings.fromMap(config))
                .getMessage());
    }
}
