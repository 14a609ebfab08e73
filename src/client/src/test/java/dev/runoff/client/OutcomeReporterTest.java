package dev.runoff.client;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.runoff.records.Decoded;
import dev.runoff.records.Format;
import dev.runoff.records.RecordCodec;
import dev.runoff.records.RecordRejectedException;
import dev.runoff.records.avro.EventType;
import dev.runoff.records.avro.OutcomeEvent;
import java.nio.charset.StandardCharsets;
import java.time.Clock;
import java.time.Instant;
import java.time.ZoneOffset;
import java.util.List;
import org.apache.kafka.clients.producer.MockProducer;
import org.apache.kafka.clients.producer.ProducerRecord;
import org.apache.kafka.common.serialization.ByteArraySerializer;
import org.apache.kafka.common.serialization.StringSerializer;
import org.junit.jupiter.api.Test;

/** Exposure and outcome events as the job's codec reads them, without a broker. */
class OutcomeReporterTest {

    private static final long NOW = ControlRecords.NOW;
    private static final String RAW_UNIT = "alice@example.com";

    private final MockProducer<String, byte[]> producer =
            new MockProducer<>(true, null, new StringSerializer(), new ByteArraySerializer());
    private final UnitPseudonymizer pseudonymizer = UnitPseudonymizer.withKey(new byte[32]);
    private final Clock clock = Clock.fixed(Instant.ofEpochMilli(NOW), ZoneOffset.UTC);

    private OutcomeReporter reporter(Format format) {
        return OutcomeReporter.builder(producer, pseudonymizer).topic("outcomes").clock(clock).format(format).build();
    }

    @Test
    void exposureIsAcceptedByTheJobsValidation() {
        reporter(Format.AVRO).exposure("checkout-button", RAW_UNIT, "green", "req-1");
        ProducerRecord<String, byte[]> sent = single();
        Decoded<OutcomeEvent> decoded = RecordCodec.outcomeEvents().decode(sent.value(), NOW);
        assertTrue(decoded.isValid(), decoded.toString());
        OutcomeEvent event = decoded.orThrow();
        assertEquals("checkout-button", event.getExperimentId());
        assertEquals(pseudonymizer.pseudonym(RAW_UNIT), event.getUnitId());
        assertEquals("req-1", event.getEventId());
        assertEquals(EventType.EXPOSURE, event.getType());
        assertEquals("green", event.getArm());
        assertEquals(NOW, event.getTimestamp());
        assertNull(event.getValue());
        assertEquals("outcomes", sent.topic());
        assertEquals(event.getUnitId(), sent.key());
        assertEquals(NOW, sent.timestamp());
    }

    @Test
    void rawUnitIdLeavesNeitherKeyNorValue() {
        reporter(Format.JSON).exposure("e", RAW_UNIT, "a", "req-2");
        ProducerRecord<String, byte[]> sent = single();
        assertFalse(sent.key().contains("alice"));
        String json = new String(sent.value(), StandardCharsets.UTF_8);
        assertFalse(json.contains("alice"), json);
        assertTrue(RecordCodec.outcomeEvents().decode(sent.value(), NOW).isValid());
    }

    @Test
    void aSignalOfAnAssignmentCarriesTheServedArmAndTheSignal() {
        ArmAssignment served = ArmAssignment.of("e", RAW_UNIT, "green");
        assertTrue(reporter(Format.AVRO).signal(served, "pay-1", "payment-failed").isPresent());
        OutcomeEvent event = RecordCodec.outcomeEvents().decode(single().value(), NOW).orThrow();
        assertEquals("payment-failed", event.getSignal());
        assertEquals("green", event.getArm());
    }

    @Test
    void conversionOfAnAssignmentCarriesTheServedArm() {
        ArmAssignment served = ArmAssignment.of("e", RAW_UNIT, "green");
        assertTrue(reporter(Format.AVRO).outcome(served, "order-77", EventType.CONVERSION, 19.99).isPresent());
        OutcomeEvent event = RecordCodec.outcomeEvents().decode(single().value(), NOW).orThrow();
        assertEquals(EventType.CONVERSION, event.getType());
        assertEquals("green", event.getArm());
        assertEquals(19.99, event.getValue());
        assertEquals(pseudonymizer.pseudonym(RAW_UNIT), event.getUnitId());
    }

    @Test
    void exposureAndClickOfATablesAssignmentCarryItsArm() {
        AllocationTable table = AllocationTable.create(PickPolicy.builder("fallback").build(), clock);
        table.apply("e", ControlRecords.avro(ControlRecords.running("e", 1, "a", 0.5, "b", 0.5)));
        ArmAssignment served = table.assign("e", RAW_UNIT);
        OutcomeReporter reporter = reporter(Format.JSON);
        assertTrue(reporter.exposure(served, "req-1").isPresent());
        assertTrue(reporter.outcome(served, "click-1", EventType.CLICK, null).isPresent());
        List<ProducerRecord<String, byte[]>> history = producer.history();
        assertEquals(2, history.size());
        for (ProducerRecord<String, byte[]> sent : history) {
            OutcomeEvent event = RecordCodec.outcomeEvents().decode(sent.value(), NOW).orThrow();
            assertEquals(served.arm(), event.getArm());
            assertEquals(pseudonymizer.pseudonym(RAW_UNIT), event.getUnitId());
        }
    }

    @Test
    void assignmentNotDrawnForTheExperimentSendsNothing() {
        AllocationTable table = AllocationTable.create(PickPolicy.builder("fallback").build(), clock);
        ArmAssignment unknown = table.assign("not-held", RAW_UNIT);
        OutcomeReporter reporter = reporter(Format.AVRO);
        assertTrue(reporter.exposure(unknown, "req-1").isEmpty());
        assertTrue(reporter.outcome(unknown, "click-1", EventType.CLICK, null).isEmpty());
        assertEquals(List.of(), producer.history());
    }

    @Test
    void outcomeWithoutArmIsRefused() {
        OutcomeReporter reporter = reporter(Format.AVRO);
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class,
                () -> reporter.outcome("e", RAW_UNIT, null, "ev", EventType.CONVERSION, null));
        assertTrue(e.getMessage().contains("arm"), e.getMessage());
        assertThrows(IllegalArgumentException.class, () -> ArmAssignment.of("e", RAW_UNIT, " "));
        assertEquals(List.of(), producer.history());
    }

    @Test
    void invalidEventsAreRefusedBeforeSending() {
        OutcomeReporter reporter = reporter(Format.AVRO);
        assertThrows(RecordRejectedException.class, () -> reporter.exposure("e", RAW_UNIT, "a", " "));
        assertThrows(RecordRejectedException.class, () -> reporter.exposure("e", RAW_UNIT, null, "ev"));
        assertThrows(RecordRejectedException.class, () -> reporter.outcome("e", RAW_UNIT, "a", "ev", EventType.VALUE, null));
        IllegalArgumentException exposureAsOutcome = assertThrows(IllegalArgumentException.class,
                () -> reporter.outcome("e", RAW_UNIT, "a", "ev", EventType.EXPOSURE, null));
        assertTrue(exposureAsOutcome.getMessage().contains("EXPOSURE"));
        assertEquals(List.of(), producer.history());
    }

    private ProducerRecord<String, byte[]> single() {
        List<ProducerRecord<String, byte[]>> history = producer.history();
        assertEquals(1, history.size());
        return history.get(0);
    }
}
