package dev.runoff.topology;

import dev.runoff.engine.stats.BernoulliStats;

import static dev.runoff.topology.TopologyFixture.T0;
import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.runoff.records.avro.EventType;
import dev.runoff.records.avro.ExperimentDefinition;
import dev.runoff.records.avro.MetricKind;
import dev.runoff.records.avro.MetricSpec;
import dev.runoff.testkit.TestDefinitions;
import java.nio.charset.StandardCharsets;
import java.util.List;
import org.apache.kafka.streams.test.TestRecord;
import org.junit.jupiter.api.AfterEach;
import org.junit.jupiter.api.Test;

/**
 * The rejection codes that need more than one bad record to provoke: events the validator refuses for what
 * the experiment's metric needs, pre-aggregated statistics that lose a race with a definition change or an
 * end, and bytes on an internal topic that the job did not write. Each goes to the rejected topic with its
 * code, a message naming what is wrong, and is counted.
 */
class RejectionCodesTest {

    private final TopologyFixture job = new TopologyFixture();

    @AfterEach
    void close() {
        job.close();
    }

    @Test
    void aTrialEventWithoutAnArmIsMissingArm() {
        ExperimentDefinition def = TestDefinitions.bernoulli("e", "a", "b");
        def.setMetric(MetricSpec.newBuilder().setKind(MetricKind.BERNOULLI).setTrialEvent(EventType.CLICK)
                .setSuccessEvent(EventType.CONVERSION).build());
        job.define(def);
        byte[] exposure = Events.json("e", "u1", "x1", "CLICK", T0, null, null);
        job.event("u1", exposure);
        TestRecord<String, byte[]> rejected = only("missing-arm", "arm: missing");
        assertArrayEquals(exposure, rejected.value(), "the original bytes");
    }

    @Test
    void aValueEventWithoutAValueIsMissingValue() {
        ExperimentDefinition def = TestDefinitions.value("v", "a", "b");
        def.setMetric(MetricSpec.newBuilder().setKind(MetricKind.VALUE).setTrialEvent(EventType.EXPOSURE)
                .setValueEvent(EventType.CONVERSION).build());
        job.define(def);
        job.event("u1", Events.exposure("v", "u1", "x1", "a", T0));
        job.event("u1", Events.json("v", "u1", "v1", "CONVERSION", T0, null, null));
        only("missing-value", "value: missing");
    }

    @Test
    void statisticsForAnExperimentThatEndedBeforeTheFlushAreDeltaUnknownExperiment() {
        // per-exposure counting: the exposure is a trial at once, so the flushed statistics hold it
        job.define(TestDefinitions.perExposure(TestDefinitions.bernoulli("gone", "a", "b")));
        job.advance(100);
        job.rejected();
        job.event("u1", Events.exposure("gone", "u1", "x1", "a", job.clock()));
        job.defineRaw(TopologyFixture.utf8("gone"), null);
        job.advance(200);
        TestRecord<String, byte[]> rejected = only("delta-unknown-experiment", "no experiment 'gone' is held");
        String body = new String(rejected.value(), StandardCharsets.UTF_8);
        assertTrue(body.contains("\"arm\":\"a\"") && body.contains("\"trials\":1"), body);
    }

    @Test
    void statisticsForAnArmTheNewVersionDroppedAreDeltaUnknownArm() {
        job.define(TestDefinitions.bernoulli("shrink", "a", "b", "c"));
        job.advance(100);
        job.event("u1", Events.exposure("shrink", "u1", "x1", "c", job.clock()));
        job.define(TestDefinitions.bernoulli("shrink", "a", "b"));
        job.advance(200);
        only("delta-unknown-arm", "arm: 'c' is not an arm of version 2");
    }

    @Test
    void statisticsOfTheOtherMetricKindAreDeltaMetricMismatch() {
        // A definition's metric kind can no longer change (refused as metric-change), so only an internal record
        // the job did not write can carry statistics of the other kind: piped straight onto the repartition topic.
        job.define(TestDefinitions.value("kind", "a", "b"));
        job.advance(100);
        StageTwo delta = StageTwo.delta(new ArmDelta("kind", "a", 1, new BernoulliStats(1, 0), 0));
        job.rawInput("runoff-ttd-by-experiment-repartition").pipeInput(TopologyFixture.utf8("kind"),
                StageTwo.SERDE.serializer().serialize("by-experiment", delta));
        job.advance(200);
        only("delta-metric-mismatch", "BERNOULLI statistics for an experiment whose metric is VALUE");
    }

    /**
     * Counted here; the topology test driver does not show the dead letters of the deserialization handler
     * on the output topics, so ProductionFailuresIT checks the dead letter itself on the real broker.
     */
    @Test
    void bytesOnAnInternalTopicThatTheJobDidNotWriteAreCountedAsDeserializationError() {
        byte[] garbage = "not a stage-two message".getBytes(StandardCharsets.UTF_8);
        job.rawInput("runoff-ttd-by-experiment-repartition").pipeInput(TopologyFixture.utf8("k"), garbage);
        assertEquals(1, job.counters().count("deserialization-error"));
        job.define(TestDefinitions.bernoulli("after", "a", "b"));
        assertEquals(1, job.accepted().size(), "processing went on");
    }

    /** The one rejected record with {@code code}, its message containing {@code text}; counted once. */
    private TestRecord<String, byte[]> only(String code, String text) {
        List<TestRecord<String, byte[]>> all = job.rejected();
        List<TestRecord<String, byte[]>> rejected = all.stream()
                .filter(r -> code.equals(TopologyFixture.header(r, Rejections.REASON_HEADER))).toList();
        assertEquals(1, rejected.size(), code + " records among " + all.stream().map(r -> TopologyFixture.header(r,
                Rejections.REASON_HEADER) + ": " + TopologyFixture.header(r, Rejections.MESSAGE_HEADER)).toList());
        String message = TopologyFixture.header(rejected.get(0), Rejections.MESSAGE_HEADER);
        assertTrue(message.contains(text), "message '" + message + "' should contain '" + text + "'");
        assertEquals(1, job.counters().count(code), code + " counted");
        return rejected.get(0);
    }
}
