package dev.runoff.engine.guardrail;

import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.runoff.engine.planning.SimulationSummary;
import org.apache.commons.rng.UniformRandomProvider;
import org.apache.commons.rng.simple.RandomSource;
import org.junit.jupiter.api.Test;

/**
 * Seeded simulations of the guardrail test under continuous monitoring: a check after every batch of units,
 * as the job checks at every allocation pass.
 */
class MarginCheckSimulationTest {

    private static final double ALPHA = 0.05;
    private static final double MARGIN = 0.2;
    private static final double REFERENCE_RATE = 0.05;
    private static final int RUNS = 400;
    private static final int BATCH = 50;
    private static final int CHECKS = 200;

    /**
     * An arm exactly at the margin ((1 + m) times the reference rate, the hardest true rate that must not
     * fail) is suspended in at most alpha of the runs, although it is checked 200 times per run. The check
     * is that the upper end of the two-sided 95% Clopper-Pearson interval of the observed rate (Clopper and
     * Pearson 1934) is at most alpha.
     */
    @Test
    void anArmWithinTheMarginIsSuspendedAtMostAlphaOfTheTime() {
        int failed = runs(REFERENCE_RATE * (1 + MARGIN), 11L);
        SimulationSummary.Interval rate = SimulationSummary.Interval.clopperPearson(failed, RUNS, 0.95);
        assertTrue(rate.upper() <= ALPHA, failed + " of " + RUNS + " runs failed: " + rate);
    }

    /**
     * The sequence of one arm contains its true rate at all 200 checks of a run in at least 1 - alpha of the
     * runs (the time-uniform coverage of Howard et al. 2021, Section 1): the upper end of the 95%
     * Clopper-Pearson interval of the observed miss rate is at most alpha. A fixed-sample interval checked as
     * often misses far more often (the peeking problem the sequence exists for).
     */
    @Test
    void theSequenceContainsTheTrueRateAtEveryCheckInAtLeastOneMinusAlphaOfTheRuns() {
        UniformRandomProvider rng = RandomSource.XO_SHI_RO_256_PP.create(13L);
        int missed = 0;
        for (int run = 0; run < RUNS; run++) {
            missed += everMisses(rng) ? 1 : 0;
        }
        SimulationSummary.Interval rate = SimulationSummary.Interval.clopperPearson(missed, RUNS, 0.95);
        assertTrue(rate.upper() <= ALPHA, missed + " of " + RUNS + " runs missed: " + rate);
    }

    private static boolean everMisses(UniformRandomProvider rng) {
        long hits = 0;
        for (int check = 1; check <= CHECKS; check++) {
            hits += hits(rng, REFERENCE_RATE);
            RateSequence.Bounds b = RateSequence.bounds((long) check * BATCH, hits, ALPHA);
            if (b.lower() > REFERENCE_RATE || b.upper() < REFERENCE_RATE) {
                return true;
            }
        }
        return false;
    }

    /** An arm at twice the reference rate (well past the 20% margin) fails in at least 95% of the runs. */
    @Test
    void aClearlyWorseArmIsSuspended() {
        int failed = runs(2 * REFERENCE_RATE, 12L);
        assertTrue(failed >= 0.95 * RUNS, failed + " of " + RUNS + " runs failed");
    }

    /** Runs in which the arm ever FAILED within CHECKS checks of BATCH units per arm. */
    private static int runs(double armRate, long seed) {
        UniformRandomProvider rng = RandomSource.XO_SHI_RO_256_PP.create(seed);
        int failed = 0;
        for (int run = 0; run < RUNS; run++) {
            failed += everFails(rng, armRate) ? 1 : 0;
        }
        return failed;
    }

    private static boolean everFails(UniformRandomProvider rng, double armRate) {
        long armHits = 0;
        long referenceHits = 0;
        for (int check = 1; check <= CHECKS; check++) {
            armHits += hits(rng, armRate);
            referenceHits += hits(rng, REFERENCE_RATE);
            long units = (long) check * BATCH;
            MarginCheck.Result result = MarginCheck.check(new MarginCheck.Counts(units, armHits),
                    new MarginCheck.Counts(units, referenceHits), Direction.HIGHER_IS_WORSE, MARGIN, ALPHA);
            if (result.outcome() == MarginCheck.Outcome.FAIL) {
                return true;
            }
        }
        return false;
    }

    private static int hits(UniformRandomProvider rng, double rate) {
        int hits = 0;
        for (int i = 0; i < BATCH; i++) {
            hits += rng.nextDouble() < rate ? 1 : 0;
        }
        return hits;
    }
}
