package dev.runoff.bench;

import dev.runoff.records.RecordCodec;
import dev.runoff.records.avro.AllocationUpdate;
import dev.runoff.records.avro.ArmWeight;
import dev.runoff.records.avro.ExperimentStatus;
import dev.runoff.client.AllocationTable;
import dev.runoff.client.CoarseClock;
import dev.runoff.client.ControlRecordOutcome;
import dev.runoff.client.PickPolicy;
import dev.runoff.client.SplitMixUniform;
import java.time.Clock;
import java.time.Duration;
import java.util.List;
import java.util.concurrent.TimeUnit;
import org.openjdk.jmh.annotations.Benchmark;
import org.openjdk.jmh.annotations.BenchmarkMode;
import org.openjdk.jmh.annotations.Fork;
import org.openjdk.jmh.annotations.Measurement;
import org.openjdk.jmh.annotations.Mode;
import org.openjdk.jmh.annotations.OutputTimeUnit;
import org.openjdk.jmh.annotations.Param;
import org.openjdk.jmh.annotations.Scope;
import org.openjdk.jmh.annotations.Setup;
import org.openjdk.jmh.annotations.TearDown;
import org.openjdk.jmh.annotations.State;
import org.openjdk.jmh.annotations.Threads;
import org.openjdk.jmh.annotations.Warmup;

/**
 * {@link AllocationTable#pick} on the request path: a table of 50 experiments, picks in one of them (4 arms)
 * for 4096 distinct unit keys of 13 chars, on the system clock or on a {@link CoarseClock}. Target: median under 100 ns per pick with
 * one thread and with 8 threads calling at once. SampleTime gives the median (p0.50; each sample includes
 * the timer's own cost), AverageTime the mean; add {@code -prof gc} to see the allocation per pick.
 *
 * <p>Run: {@code mvn -B -q -o -pl src/bench -Pbench exec:exec -Dbench=PickBench -Dbench.args="-f 1 -wi 3 -i 5"}.
 */
@BenchmarkMode({Mode.SampleTime, Mode.AverageTime})
@OutputTimeUnit(TimeUnit.NANOSECONDS)
@Warmup(iterations = 3, time = 1)
@Measurement(iterations = 5, time = 2)
@Fork(1)
@State(Scope.Benchmark)
public class PickBench {
    private static final String EXPERIMENT = "experiment-17";
    private static final int UNITS = 4096;

    /** Assignment mode: HASHED (hash of the unit key) or RANDOM (shared seeded SplitMix64 source). */
    @Param({"HASHED", "RANDOM"})
    public String assignment;

    /** Clock of the staleness check: the system clock, or a CoarseClock ticking every 10 ms over it. */
    @Param({"SYSTEM", "COARSE"})
    public String clock;

    private CoarseClock coarse;

    private AllocationTable table;
    private String[] units;

    /** Fills the table and the unit keys. */
    @Setup
    public void setUp() {
        PickPolicy.Builder policy = PickPolicy.builder("control");
        if ("RANDOM".equals(assignment)) {
            policy.random(SplitMixUniform.seeded(1));
        }
        Clock time = Clock.systemUTC();
        if ("COARSE".equals(clock)) {
            coarse = CoarseClock.start(time, Duration.ofMillis(10));
            time = coarse;
        }
        table = AllocationTable.create(policy.build(), time);
        RecordCodec<AllocationUpdate> codec = RecordCodec.allocationUpdates();
        for (int e = 0; e < 50; e++) {
            String id = "experiment-" + e;
            if (table.apply(id, codec.encode(record(id))) != ControlRecordOutcome.APPLIED) {
                throw new IllegalStateException("setup record for " + id + " was not applied");
            }
        }
        units = new String[UNITS];
        for (int i = 0; i < UNITS; i++) {
            units[i] = String.format("user-%08d", i * 7919);
        }
    }

    /** Stops the coarse clock's thread. */
    @TearDown
    public void tearDown() {
        if (coarse != null) {
            coarse.close();
        }
    }

    private static AllocationUpdate record(String id) {
        return AllocationUpdate.newBuilder().setExperimentId(id).setDefinitionVersion(1).setSequence(1)
                .setWeights(List.of(new ArmWeight("control", 0.4), new ArmWeight("green", 0.3),
                        new ArmWeight("blue", 0.2), new ArmWeight("red", 0.1)))
                .setComputedAt(0).setValidUntil(Long.MAX_VALUE).setStatus(ExperimentStatus.RUNNING)
                .setWinner(null).build();
    }

    /** Each thread walks the unit keys on its own. */
    @State(Scope.Thread)
    public static class Cursor {
        int next;
    }

    /** One request thread. */
    @Benchmark
    @Threads(1)
    public String pickOneThread(Cursor cursor) {
        return table.pick(EXPERIMENT, units[cursor.next++ & (UNITS - 1)]);
    }

    /** Eight request threads on the same table (the build machine has 2 cores). */
    @Benchmark
    @Threads(8)
    public String pickEightThreads(Cursor cursor) {
        return table.pick(EXPERIMENT, units[cursor.next++ & (UNITS - 1)]);
    }
}
