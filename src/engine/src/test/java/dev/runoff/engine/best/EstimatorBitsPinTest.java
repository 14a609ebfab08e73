package dev.runoff.engine.best;

import static org.junit.jupiter.api.Assertions.assertEquals;

import dev.runoff.engine.EngineVersion;
import dev.runoff.engine.posterior.BetaPosterior;
import dev.runoff.engine.posterior.Posterior;
import dev.runoff.engine.posterior.StudentTPosterior;
import java.io.IOException;
import java.io.InputStream;
import java.nio.charset.StandardCharsets;
import java.util.ArrayList;
import java.util.List;
import java.util.SplittableRandom;
import org.junit.jupiter.api.Test;

/**
 * Pins the exact output bits of the estimators, so that a change made for speed is seen to keep every
 * decision replayable (the audit reproduces decision records bit for bit). The expected bits in
 * {@code pins/estimator-bits.txt} were written by the code as it stood before the second round of speed
 * work on issue 15 (src/docs/performance.md); they pin replay, not correctness: the accuracy of these
 * numbers is checked by the other tests of this package against outside references.
 *
 * <p>Inputs: five-arm Beta posteriors like the job's (2,000 to 20,000 trials, rates 2% to 12%, from a
 * seeded generator), small and sub-1 shapes, a near-tie, and Student-t arms; for each, the adaptive Monte
 * Carlo estimate (alphas and standard errors), a fixed 10,000-draw Monte Carlo estimate, the exact
 * alphas, the indifference-zone probability and the expected gains.
 */
class EstimatorBitsPinTest {
    private static final String PINS = "/pins/estimator-bits.txt";

    @Test
    void estimatorsGiveThePinnedBits() throws IOException {
        List<String> expected = pinned();
        List<String> actual = lines();
        assertEquals(expected.size(), actual.size(), "number of pinned values");
        for (int i = 0; i < expected.size(); i++) {
            assertEquals(expected.get(i), actual.get(i), "pinned value " + i);
        }
    }

    @Test
    void engineVersion12GivesThePinnedBitsWhateverTheEvaluationReads() throws IOException {
        // the adaptive Monte Carlo lines of the pins, through the estimator the version type hands out
        List<String> expected = pinned().stream().filter(l -> l.contains(" adaptive-")).toList();
        List<String> actual = new ArrayList<>();
        List<List<Posterior>> cases = cases();
        AlphaReaders everything = new AlphaReaders(a -> a, 2, new LeaderThreshold(0.999, 3));
        for (int c = 0; c < cases.size(); c++) {
            ProbabilityBest pb = EngineVersion.V1_2.monteCarlo(40_000, everything).estimate(cases.get(c), 1_000L + c);
            add(actual, c, "adaptive-alpha", pb.alpha());
            add(actual, c, "adaptive-se", pb.standardError());
        }
        assertEquals(expected.stream().sorted().toList(), actual.stream().sorted().toList());
    }

    private static List<String> pinned() throws IOException {
        try (InputStream in = EstimatorBitsPinTest.class.getResourceAsStream(PINS)) {
            if (in == null) {
                throw new IOException("missing test resource " + PINS);
            }
            return new String(in.readAllBytes(), StandardCharsets.UTF_8).lines().toList();
        }
    }

    /** One line per output value: case, what, index, the value's bits in hex. */
    static List<String> lines() {
        List<String> out = new ArrayList<>();
        List<List<Posterior>> cases = cases();
        for (int c = 0; c < cases.size(); c++) {
            List<Posterior> arms = cases.get(c);
            long seed = 1_000L + c;
            add(out, c, "adaptive-alpha", new AdaptiveMonteCarlo(40_000).estimate(arms, seed).alpha());
            add(out, c, "adaptive-se", new AdaptiveMonteCarlo(40_000).estimate(arms, seed).standardError());
            add(out, c, "mc-alpha", new MonteCarloProbabilityBest(10_000).estimate(arms, seed).alpha());
            add(out, c, "exact-alpha", new ExactProbabilityBest().estimate(arms, seed).alpha());
            add(out, c, "within", new double[] {ExactProbabilityBest.probabilityWithin(arms, 0, 0.001)});
            add(out, c, "gain", ExpectedGain.valueOfBeingBest(arms));
        }
        return out;
    }

    private static void add(List<String> out, int c, String what, double[] values) {
        for (int i = 0; i < values.length; i++) {
            out.add(c + " " + what + " " + i + " " + Long.toHexString(Double.doubleToRawLongBits(values[i])));
        }
    }

    private static List<List<Posterior>> cases() {
        List<List<Posterior>> cases = new ArrayList<>();
        SplittableRandom random = new SplittableRandom(15);
        for (int c = 0; c < 12; c++) {
            List<Posterior> arms = new ArrayList<>();
            for (int arm = 0; arm < 5; arm++) {
                long trials = 2_000 + random.nextInt(18_000);
                long successes = Math.round(trials * (0.02 + 0.1 * random.nextDouble()));
                arms.add(new BetaPosterior(1 + successes, 1 + trials - successes));
            }
            cases.add(arms);
        }
        cases.add(List.of(new BetaPosterior(1, 1), new BetaPosterior(2, 3), new BetaPosterior(0.5, 0.5)));
        cases.add(List.of(new BetaPosterior(0.2, 7), new BetaPosterior(1.5, 0.4), new BetaPosterior(3, 30),
                new BetaPosterior(12, 90)));
        cases.add(List.of(new BetaPosterior(501, 9_500), new BetaPosterior(500, 9_501),
                new BetaPosterior(499, 9_400), new BetaPosterior(40, 2_000)));
        cases.add(List.of(new StudentTPosterior(1.0, 0.2, 9), new StudentTPosterior(1.1, 0.3, 4),
                new StudentTPosterior(0.4, 0.1, 30), new StudentTPosterior(1.05, 0.25, 1.5)));
        return cases;
    }
}
