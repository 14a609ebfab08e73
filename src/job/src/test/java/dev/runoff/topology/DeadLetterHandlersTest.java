package dev.runoff.topology;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.nio.charset.StandardCharsets;
import java.time.Duration;
import java.time.Instant;
import java.util.List;
import java.util.Properties;
import java.util.concurrent.atomic.AtomicBoolean;
import org.apache.kafka.common.serialization.Serdes;
import org.apache.kafka.streams.StreamsBuilder;
import org.apache.kafka.streams.TestInputTopic;
import org.apache.kafka.streams.TestOutputTopic;
import org.apache.kafka.streams.Topology;
import org.apache.kafka.streams.TopologyTestDriver;
import org.apache.kafka.streams.kstream.Consumed;
import org.apache.kafka.streams.kstream.Produced;
import org.apache.kafka.streams.processor.PunctuationType;
import org.apache.kafka.streams.processor.api.ContextualProcessor;
import org.apache.kafka.streams.processor.api.ProcessorContext;
import org.apache.kafka.streams.processor.api.Record;
import org.apache.kafka.streams.test.TestRecord;
import org.junit.jupiter.api.Test;

/**
 * The job's exception handlers under Kafka Streams: a processor that throws on one record and a punctuation
 * that throws once. The failing record and the punctuation failure become dead letters on the rejected
 * topic with the job's headers, and processing continues.
 */
class DeadLetterHandlersTest {

    private static final String INPUT = "in";
    private static final String OUTPUT = "out";

    @Test
    void processingFailureIsDeadLetteredWithTheRawRecordAndProcessingContinues() {
        JobCounters counters = new JobCounters();
        try (TopologyTestDriver driver = driver(counters)) {
            TestInputTopic<String, String> in = driver.createInputTopic(INPUT, Serdes.String().serializer(),
                    Serdes.String().serializer());
            TestOutputTopic<String, String> out = driver.createOutputTopic(OUTPUT, Serdes.String().deserializer(),
                    Serdes.String().deserializer());
            in.pipeInput("k1", "fine");
            in.pipeInput("k2", "boom");
            in.pipeInput("k3", "also fine");
            assertEquals(List.of("fine", "also fine"), out.readValuesToList());
            List<TestRecord<byte[], byte[]>> dead = rejected(driver).readRecordsToList();
            assertEquals(1, dead.size());
            assertArrayEquals(utf8("k2"), dead.get(0).key());
            assertArrayEquals(utf8("boom"), dead.get(0).value());
            assertEquals("processing-error", TopologyFixture.header(dead.get(0), Rejections.REASON_HEADER));
            assertTrue(TopologyFixture.header(dead.get(0), Rejections.MESSAGE_HEADER).contains("refused 'boom'"));
            assertTrue(TopologyFixture.header(dead.get(0), Rejections.SOURCE_HEADER).startsWith("in/0/1"));
            assertEquals(1, counters.count("processing-error"));
        }
    }

    @Test
    void punctuationFailureWithoutARecordIsDeadLetteredAndPunctuationGoesOn() {
        JobCounters counters = new JobCounters();
        try (TopologyTestDriver driver = driver(counters)) {
            TestOutputTopic<String, String> out = driver.createOutputTopic(OUTPUT, Serdes.String().deserializer(),
                    Serdes.String().deserializer());
            driver.advanceWallClockTime(Duration.ofSeconds(1));
            driver.advanceWallClockTime(Duration.ofSeconds(1));
            List<TestRecord<byte[], byte[]>> dead = rejected(driver).readRecordsToList();
            assertEquals(1, dead.size(), "the first punctuation failed");
            assertArrayEquals(utf8("flaky"), dead.get(0).key(), "keyed by the processor name");
            assertNull(dead.get(0).value());
            assertEquals("punctuation-error", TopologyFixture.header(dead.get(0), Rejections.REASON_HEADER));
            assertTrue(TopologyFixture.header(dead.get(0), Rejections.SOURCE_HEADER).startsWith("punctuation"));
            assertEquals(List.of("tick"), out.readValuesToList(), "the second punctuation ran");
        }
    }

    private static TopologyTestDriver driver(JobCounters counters) {
        Properties props = TopologyFixture.driverConfig(TopologyFixture.SETTINGS, counters, "handlers");
        return new TopologyTestDriver(flakyTopology(), props, Instant.ofEpochMilli(TopologyFixture.T0));
    }

    private static TestOutputTopic<byte[], byte[]> rejected(TopologyTestDriver driver) {
        return driver.createOutputTopic(TopologyFixture.SETTINGS.rejectedTopic(), Serdes.ByteArray().deserializer(),
                Serdes.ByteArray().deserializer());
    }

    /** Passes values through, throws on "boom", and punctuates every second: the first time it throws. */
    static Topology flakyTopology() {
        StreamsBuilder builder = new StreamsBuilder();
        builder.stream(INPUT, Consumed.with(Serdes.String(), Serdes.String()))
                .process(Flaky::new, org.apache.kafka.streams.kstream.Named.as("flaky"))
                .to(OUTPUT, Produced.with(Serdes.String(), Serdes.String()));
        return builder.build();
    }

    private static byte[] utf8(String text) {
        return text.getBytes(StandardCharsets.UTF_8);
    }

    /** The failing processor. */
    static final class Flaky extends ContextualProcessor<String, String, String, String> {
        private final AtomicBoolean failed = new AtomicBoolean();

        @Override
        public void init(ProcessorContext<String, String> context) {
            super.init(context);
            context.schedule(Duration.ofSeconds(1), PunctuationType.WALL_CLOCK_TIME, now -> {
                if (failed.compareAndSet(false, true)) {
                    throw new IllegalStateException("punctuation failed on purpose");
                }
                context.forward(new Record<>("tick", "tick", now));
            });
        }

        @Override
        public void process(Record<String, String> record) {
            if (record.value().equals("boom")) {
                throw new IllegalArgumentException("refused 'boom'");
            }
            context().forward(record);
        }
    }
}
