package dev.runoff.engine.guardrail;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.runoff.engine.planning.SimulationSummary;
import java.util.SplittableRandom;
import java.util.function.ToDoubleFunction;
import org.apache.commons.math3.distribution.NormalDistribution;
import org.junit.jupiter.api.Test;

/**
 * Seeded simulations of the guardrail test on bounded observations that are not 0/1, as a value guardrail
 * feeds it (each unit's capped sum divided by the cap): a check after every batch of units, as the job checks
 * at every allocation pass. The scenario values are invented.
 *
 * <p>Measured with the seeds below (400 runs, 200 checks of 50 units each, alpha 0.05; 10% buyers,
 * lognormal(log 40, 1.5) spend capped at 150, capped mean over the cap 0.0409): the sequence missed the true
 * mean of the zero-inflated values in 0 runs and of the two-point distribution in 0 (95% Clopper-Pearson upper
 * end 0.92% each); an arm exactly at the margin was suspended in 0 runs, one at 2.5 times the reference's mean
 * in 400 of 400. The sequence is conservative here: these observations vary less than 0/1 ones of the same
 * mean, and the bound is the one for 0/1 observations (on 0/1 data it missed in 2 runs of 400,
 * {@link MarginCheckSimulationTest}).
 */
class ValueMarginCheckSimulationTest {

    private static final double ALPHA = 0.05;
    private static final double MARGIN = 0.2;
    private static final int RUNS = 400;
    private static final int BATCH = 50;
    private static final int CHECKS = 200;
    private static final double CAP = 150;
    private static final double MU = StrictMath.log(40);
    private static final double SIGMA = 1.5;

    /** A share {@code buyers} of units spend lognormal(MU, SIGMA); each unit's spend is capped at CAP. */
    private record Spend(double buyers) {
        double scaled(SplittableRandom rng) {
            if (rng.nextDouble() >= buyers) {
                return 0;
            }
            return Math.min(CAP, StrictMath.exp(MU + SIGMA * rng.nextGaussian())) / CAP;
        }

        /**
         * The exact mean of the capped spend over the cap: buyers * (E[Y; Y < c] + c P(Y >= c)) / c for Y
         * lognormal(mu, sigma), with E[Y; Y < c] = exp(mu + sigma^2 / 2) Phi((log c - mu - sigma^2) / sigma)
         * (the lognormal partial expectation, from memory; checked against a million draws in
         * {@link #theExactCappedMeanAgreesWithDraws}).
         */
        double mean() {
            NormalDistribution phi = new NormalDistribution(0, 1);
            double logCap = StrictMath.log(CAP);
            double below = StrictMath.exp(MU + SIGMA * SIGMA / 2)
                    * phi.cumulativeProbability((logCap - MU - SIGMA * SIGMA) / SIGMA);
            double above = CAP * (1 - phi.cumulativeProbability((logCap - MU) / SIGMA));
            return buyers * (below + above) / CAP;
        }
    }

    private static final Spend REFERENCE = new Spend(0.1);

    /** The exact mean the tests rely on agrees with the average of 10^6 draws within 5 standard errors. */
    @Test
    void theExactCappedMeanAgreesWithDraws() {
        SplittableRandom rng = new SplittableRandom(5L);
        int n = 1_000_000;
        double sum = 0;
        double squares = 0;
        for (int i = 0; i < n; i++) {
            double x = REFERENCE.scaled(rng);
            sum += x;
            squares += x * x;
        }
        double mean = sum / n;
        double se = StrictMath.sqrt((squares / n - mean * mean) / n);
        assertEquals(REFERENCE.mean(), mean, 5 * se);
    }

    /**
     * The sequence of one arm contains the true mean of zero-inflated, capped lognormal values at all 200
     * checks of a run in at least 1 - alpha of the runs (time-uniform coverage, Howard et al. 2021, Section 1;
     * valid for any observations in [0, 1] by the convexity argument in {@link RateSequence#meanBounds}). The
     * check: the upper end of the two-sided 95% Clopper-Pearson interval (Clopper and Pearson 1934) of the
     * observed miss rate is at most alpha.
     */
    @Test
    void theSequenceCoversTheMeanOfCappedZeroInflatedValues() {
        int missed = misses(REFERENCE::scaled, REFERENCE.mean(), 21L);
        SimulationSummary.Interval rate = SimulationSummary.Interval.clopperPearson(missed, RUNS, 0.95);
        assertTrue(rate.upper() <= ALPHA, missed + " of " + RUNS + " runs missed: " + rate);
    }

    /** The same for values 0.3 or 0.7 with equal chance (mean 0.5), an observation never 0 or 1. */
    @Test
    void theSequenceCoversTheMeanOfATwoPointDistribution() {
        int missed = misses(rng -> rng.nextBoolean() ? 0.7 : 0.3, 0.5, 22L);
        SimulationSummary.Interval rate = SimulationSummary.Interval.clopperPearson(missed, RUNS, 0.95);
        assertTrue(rate.upper() <= ALPHA, missed + " of " + RUNS + " runs missed: " + rate);
    }

    /**
     * An arm whose capped mean is exactly (1 + margin) times the reference's (a share of buyers 1.2 times
     * larger, spending alike) is suspended in at most alpha of the runs (95% Clopper-Pearson upper end).
     */
    @Test
    void aValueArmWithinTheMarginIsSuspendedAtMostAlphaOfTheTime() {
        int failed = failures(new Spend(REFERENCE.buyers() * (1 + MARGIN)), 23L);
        SimulationSummary.Interval rate = SimulationSummary.Interval.clopperPearson(failed, RUNS, 0.95);
        assertTrue(rate.upper() <= ALPHA, failed + " of " + RUNS + " runs failed: " + rate);
    }

    /** An arm at 2.5 times the reference's capped mean fails in at least 95% of the runs. */
    @Test
    void aClearlyWorseValueArmIsSuspended() {
        int failed = failures(new Spend(REFERENCE.buyers() * 2.5), 24L);
        assertTrue(failed >= 0.95 * RUNS, failed + " of " + RUNS + " runs failed");
    }

    private static int misses(ToDoubleFunction<SplittableRandom> draw, double mean, long seed) {
        SplittableRandom rng = new SplittableRandom(seed);
        int missed = 0;
        for (int run = 0; run < RUNS; run++) {
            double total = 0;
            for (int check = 1; check <= CHECKS; check++) {
                total += batch(rng, draw);
                RateSequence.Bounds b = RateSequence.meanBounds((long) check * BATCH, total, ALPHA);
                if (b.lower() > mean || b.upper() < mean) {
                    missed++;
                    break;
                }
            }
        }
        return missed;
    }

    private static int failures(Spend arm, long seed) {
        SplittableRandom rng = new SplittableRandom(seed);
        int failed = 0;
        for (int run = 0; run < RUNS; run++) {
            double armTotal = 0;
            double referenceTotal = 0;
            for (int check = 1; check <= CHECKS; check++) {
                armTotal += batch(rng, arm::scaled);
                referenceTotal += batch(rng, REFERENCE::scaled);
                long units = (long) check * BATCH;
                MarginCheck.Result result = MarginCheck.check(new MarginCheck.Totals(units, armTotal),
                        new MarginCheck.Totals(units, referenceTotal), Direction.HIGHER_IS_WORSE, MARGIN, ALPHA);
                if (result.outcome() == MarginCheck.Outcome.FAIL) {
                    failed++;
                    break;
                }
            }
        }
        return failed;
    }

    private static double batch(SplittableRandom rng, ToDoubleFunction<SplittableRandom> draw) {
        double sum = 0;
        for (int i = 0; i < BATCH; i++) {
            sum += draw.applyAsDouble(rng);
        }
        return sum;
    }
}
