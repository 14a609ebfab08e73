package dev.runoff.topology;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.ArrayDeque;
import java.util.ArrayList;
import java.util.Comparator;
import java.util.Deque;
import java.util.List;
import java.util.SplittableRandom;
import org.junit.jupiter.api.Test;

/**
 * The claim of {@link UnitCounting#closeTime}: a job that lags behind its input counts the same rate as one
 * that keeps up when windows close by what it has read, and undercounts when they close by its wall clock.
 *
 * <p>Each of 50 seeded simulated runs has one arm with true conversion probability 0.2 within a 500 ms
 * window, one unit exposed per millisecond of event time, conversions delayed uniformly within the window,
 * records stamped at their event time and read in that order (one partition), each read half a window
 * after it was stamped (the job's lag). A punctuation every 100 ms of wall clock closes due windows through
 * {@link UnitCounting}, the code the topology runs; at the end the input goes quiet and the idle fallback
 * closes the rest.
 *
 * <p>Tolerance: by the central limit theorem the pooled observed rate of n independent matured units lies
 * within 4 standard errors (sqrt(p(1-p)/n)) of the true rate except with probability about 6e-5 (two-sided
 * normal tail at 4, from memory). Closing by the wall clock must fall outside that bound, so the test can
 * fail.
 */
class LaggingCloseBiasTest {

    private static final int RUNS = 50;
    private static final int UNITS = 4_000;
    private static final long WINDOW = 500;
    private static final long LAG = WINDOW / 2;
    private static final long FLUSH = 100;
    private static final long IDLE = 5_000;
    private static final double RATE = 0.2;
    private static final double Z = 4.0;

    @Test
    void closingByWhatWasReadCountsTheTrueRateDespiteTheLag() {
        Outcome byRead = simulate(true);
        double error = Math.sqrt(RATE * (1 - RATE) / byRead.trials());
        assertTrue(Math.abs(byRead.rate() - RATE) <= Z * error, "observed rate " + byRead.rate() + " beyond "
                + Z + " standard errors " + error + " of " + RATE);
        assertEquals(0, byRead.late(), "late outcomes");
    }

    @Test
    void closingByTheWallClockUndercountsWhenTheJobLags() {
        Outcome byWallClock = simulate(false);
        double error = Math.sqrt(RATE * (1 - RATE) / byWallClock.trials());
        assertTrue(RATE - byWallClock.rate() > Z * error, "wall-clock closing should undercount: observed rate "
                + byWallClock.rate() + ", standard error " + error);
        assertTrue(byWallClock.late() > 0, "wall-clock closing should reject late outcomes");
    }

    /** Pooled trials, successes and late outcomes over the runs. */
    private static Outcome simulate(boolean byRead) {
        Outcome total = new Outcome(0, 0, 0);
        for (int run = 0; run < RUNS; run++) {
            total = total.plus(run(new SplittableRandom(2_000 + run), byRead));
        }
        return total;
    }

    private static Outcome run(SplittableRandom random, boolean byRead) {
        List<long[]> records = new ArrayList<>();
        for (int t = 0; t < UNITS; t++) {
            records.add(new long[] {t, t, 0});
            if (random.nextDouble() < RATE) {
                records.add(new long[] {t + random.nextLong(WINDOW + 1), t, 1});
            }
        }
        records.sort(Comparator.comparingLong((long[] r) -> r[0]).thenComparingLong(r -> r[2]));
        Job job = new Job(byRead);
        for (long[] record : records) {
            long readAt = record[0] + LAG;
            job.punctuateUntil(readAt);
            job.read(record, readAt);
        }
        job.punctuateUntil(UNITS + LAG + WINDOW + IDLE + FLUSH);
        return job.outcome;
    }

    /** One task: units by index, windows to close in exposure order, the wall-clock punctuation. */
    private static final class Job {
        private final boolean byRead;
        private final UnitState[] units = new UnitState[UNITS];
        private final Deque<Integer> open = new ArrayDeque<>();
        private long nextPunctuation = FLUSH;
        private long streamTime = -1;
        private long lastReadAt;
        private Outcome outcome = new Outcome(0, 0, 0);

        Job(boolean byRead) {
            this.byRead = byRead;
        }

        void read(long[] record, long now) {
            lastReadAt = now;
            streamTime = Math.max(streamTime, record[0]);
            int unit = (int) record[1];
            if (record[2] == 0) {
                units[unit] = UnitCounting.expose(null, "a", 1, true, record[0], WINDOW, now).unit();
                open.add(unit);
                return;
            }
            UnitCounting.Step step = UnitCounting.convert(units[unit], record[0], true, now);
            units[unit] = step.unit();
            if (step.verdict() == UnitCounting.Verdict.LATE) {
                outcome = outcome.plus(new Outcome(0, 0, 1));
            }
        }

        void punctuateUntil(long now) {
            for (; nextPunctuation <= now; nextPunctuation += FLUSH) {
                long at = nextPunctuation;
                long closeTime = byRead ? UnitCounting.closeTime(at, streamTime, lastReadAt, IDLE) : at;
                while (!open.isEmpty() && units[open.peek()].closesAt() <= closeTime) {
                    int unit = open.poll();
                    UnitCounting.Step step = UnitCounting.close(units[unit], closeTime, at);
                    units[unit] = step.unit();
                    outcome = outcome.plus(new Outcome(step.count().trials(), step.count().successes(), 0));
                }
            }
        }
    }

    private record Outcome(long trials, long successes, long late) {
        Outcome plus(Outcome other) {
            return new Outcome(trials + other.trials, successes + other.successes, late + other.late);
        }

        double rate() {
            return (double) successes / trials;
        }
    }
}
