package dev.runoff.job;

import static org.junit.jupiter.api.Assertions.assertEquals;

import java.util.concurrent.atomic.AtomicLong;
import org.apache.kafka.common.TopicPartition;
import org.junit.jupiter.api.Test;

class RestoreLogTest {

    private static final TopicPartition UNITS = new TopicPartition("app-units-changelog", 3);

    @Test
    void aFinishedRestoreNamesTheStoreThePartitionTheRecordsAndTheTimeFromItsStart() {
        AtomicLong nanos = new AtomicLong(5_000_000_000L);
        RestoreLog log = new RestoreLog(nanos::get);
        log.onRestoreStart(UNITS, "units", 0, 1_000);
        log.onBatchRestored(UNITS, "units", 500, 500);
        nanos.addAndGet(1_234_000_000L);
        assertEquals("event=restored store=units changelog=app-units-changelog partition=3 records=1000 millis=1234",
                log.line(UNITS, "units", 1_000));
    }

    @Test
    void aRestoreWhoseStartWasNotSeenHasNoTime() {
        RestoreLog log = new RestoreLog(() -> 0L);
        assertEquals("event=restored store=units changelog=app-units-changelog partition=3 records=7 millis=-1",
                log.line(UNITS, "units", 7));
    }
}
