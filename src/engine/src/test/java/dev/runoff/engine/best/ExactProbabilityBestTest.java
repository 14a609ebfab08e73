package dev.runoff.engine.best;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.runoff.engine.posterior.BetaPosterior;
import dev.runoff.engine.posterior.Posterior;
import dev.runoff.engine.posterior.StudentTPosterior;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;
import java.util.SplittableRandom;
import org.apache.commons.math3.distribution.NormalDistribution;
import org.apache.commons.math3.fraction.BigFraction;
import org.junit.jupiter.api.Test;

class ExactProbabilityBestTest {

    private final ExactProbabilityBest exact = new ExactProbabilityBest();

    private double[] alphas(Posterior... posteriors) {
        return exact.estimate(List.of(posteriors), 0).alpha();
    }

    @Test
    void reproducesThePublishedWorkedValues() {
        // Cook's recursion (MD Anderson technical report) and Miller (2015), "Formulas for Bayesian A/B
        // Testing": P(Beta(6,6) > Beta(4,8)) = 521/646, P(Beta(4,5) > Beta(2,3)) = 19/33,
        // P(Beta(2,1) > Beta(1,1)) = 2/3. The test implementation of Miller's sum must give them exactly.
        assertEquals(new BigFraction(521, 646), MillerFormula.probabilityBBeatsA(4, 8, 6, 6));
        assertEquals(new BigFraction(19, 33), MillerFormula.probabilityBBeatsA(2, 3, 4, 5));
        assertEquals(new BigFraction(2, 3), MillerFormula.probabilityBBeatsA(1, 1, 2, 1));
        assertEquals(521.0 / 646, alphas(new BetaPosterior(6, 6), new BetaPosterior(4, 8))[0], 1e-14);
        assertEquals(19.0 / 33, alphas(new BetaPosterior(4, 5), new BetaPosterior(2, 3))[0], 1e-14);
        assertEquals(2.0 / 3, alphas(new BetaPosterior(2, 1), new BetaPosterior(1, 1))[0], 1e-14);
    }

    @Test
    void matchesMillersClosedFormOverAGridOfIntegerParameters() {
        // Reference: Miller (2015) closed form in exact rational arithmetic; both alphas computed directly.
        int[] values = {1, 2, 5, 13, 40};
        double worst = 0;
        for (int aA : values) {
            for (int bA : values) {
                for (int aB : values) {
                    for (int bB : values) {
                        double[] alpha = alphas(new BetaPosterior(aA, bA), new BetaPosterior(aB, bB));
                        double bWins = MillerFormula.probabilityBBeatsA(aA, bA, aB, bB).doubleValue();
                        double aWins = MillerFormula.probabilityBBeatsA(aB, bB, aA, bA).doubleValue();
                        String what = "A=Beta(" + aA + "," + bA + ") B=Beta(" + aB + "," + bB + ")";
                        assertEquals(bWins, alpha[1], 1e-9 * bWins, what);
                        assertEquals(aWins, alpha[0], 1e-9 * aWins, what);
                        worst = Math.max(worst, Math.abs(alpha[1] - bWins) / bWins);
                        worst = Math.max(worst, Math.abs(alpha[0] - aWins) / aWins);
                    }
                }
            }
        }
        assertTrue(worst < 1e-11, "worst relative error " + worst);
    }

    @Test
    void tinyAlphasAroundOneInATrillionKeepRelativeAccuracy() {
        // Reference: Miller (2015) closed form, exact. P(B > A) is 1e-11..1e-12 in the first four cases and
        // 2e-16 and 3e-19 in the last two (these need the deeper second pass).
        int[][] cases = {{200, 800, 95, 905}, {200, 800, 90, 910}, {30, 10, 2, 38}, {500, 500, 350, 650},
            {60, 940, 3, 997}, {60, 940, 1, 999}};
        for (int[] c : cases) {
            double[] alpha = alphas(new BetaPosterior(c[0], c[1]), new BetaPosterior(c[2], c[3]));
            double expected = MillerFormula.probabilityBBeatsA(c[0], c[1], c[2], c[3]).doubleValue();
            assertTrue(expected < 1e-10 && expected > 1e-20, "case not tiny enough: " + expected);
            assertEquals(expected, alpha[1], 1e-12 * expected, Arrays.toString(c));
        }
    }

    @Test
    void matchesCommonsMathIntegrationForThreeToSixArms() {
        // Reference: independent quadrature with Commons Math (CommonsMathReference).
        List<List<Posterior>> cases = List.of(
                List.of(new BetaPosterior(1, 1), new BetaPosterior(2, 1), new BetaPosterior(1, 3)),
                List.of(new BetaPosterior(11, 91), new BetaPosterior(15, 87), new BetaPosterior(9, 93),
                        new BetaPosterior(13, 89)),
                List.of(new BetaPosterior(0.5, 4), new BetaPosterior(3.5, 2), new BetaPosterior(120, 880),
                        new BetaPosterior(40, 260), new BetaPosterior(7, 55)),
                List.of(new BetaPosterior(101, 901), new BetaPosterior(106, 896), new BetaPosterior(111, 891),
                        new BetaPosterior(96, 906), new BetaPosterior(121, 881), new BetaPosterior(100, 902)),
                List.of(new StudentTPosterior(0, 1, 2), new StudentTPosterior(0.5, 1, 3),
                        new StudentTPosterior(1, 2, 2.5)),
                List.of(new StudentTPosterior(10, 0.5, 30), new StudentTPosterior(10.4, 0.8, 5),
                        new StudentTPosterior(9.5, 0.3, 200), new StudentTPosterior(10.2, 1.5, 4),
                        new StudentTPosterior(11, 2, 2.2)));
        for (List<Posterior> ps : cases) {
            double[] alpha = exact.estimate(ps, 0).alpha();
            CommonsMathReference ref = new CommonsMathReference(ps);
            for (int i = 0; i < ps.size(); i++) {
                assertEquals(ref.alpha(i), alpha[i], 1e-9, ps + " arm " + i);
            }
        }
    }

    @Test
    void alphasSumToOneOverManyRandomConfigurations() {
        // Not normalised by the code: the sum is a check of the integration (common practice).
        SplittableRandom random = new SplittableRandom(20260101L);
        for (int config = 0; config < 120; config++) {
            List<Posterior> ps = randomConfiguration(random, 2 + random.nextInt(19), config % 2 == 0);
            double[] alpha = exact.estimate(ps, 0).alpha();
            double sum = 0;
            for (double a : alpha) {
                assertTrue(a >= 0 && a <= 1, "alpha " + a + " out of range in " + ps);
                sum += a;
            }
            assertEquals(1.0, sum, 1e-9, ps.toString());
        }
    }

    @Test
    void fiftyArmsOfEitherFamilySumToOne() {
        SplittableRandom random = new SplittableRandom(50L);
        for (boolean beta : new boolean[] {true, false}) {
            List<Posterior> ps = randomConfiguration(random, 50, beta);
            double sum = Arrays.stream(exact.estimate(ps, 0).alpha()).sum();
            assertEquals(1.0, sum, 1e-9, ps.toString());
        }
    }

    static List<Posterior> randomConfiguration(SplittableRandom random, int arms, boolean beta) {
        int[] sizes = {0, 3, 20, 300, 1000, 30_000};
        int n = sizes[random.nextInt(sizes.length)];
        double rate = 0.01 + 0.9 * random.nextDouble();
        List<Posterior> ps = new ArrayList<>();
        for (int i = 0; i < arms; i++) {
            if (beta) {
                double p = Math.min(0.999, rate * (0.8 + 0.4 * random.nextDouble()));
                long s = Math.round(p * n);
                ps.add(new BetaPosterior(1 + s, 1 + n - s));
            } else {
                double[] dofs = {2.1, 3, 6, 40, 2000};
                ps.add(new StudentTPosterior(random.nextDouble() - 0.5, 0.05 + random.nextDouble(),
                        dofs[random.nextInt(dofs.length)]));
            }
        }
        return ps;
    }

    @Test
    void identicalArmsShareTheProbabilityEqually() {
        // By symmetry each of n exchangeable arms is best with probability 1/n.
        Posterior p = new BetaPosterior(30, 70);
        double[] alpha = exact.estimate(List.of(p, p, p, p, p, p, p), 0).alpha();
        for (double a : alpha) {
            assertEquals(1.0 / 7, a, 1e-12);
        }
        Posterior uniform = new BetaPosterior(1, 1);
        for (double a : exact.estimate(List.of(uniform, uniform, uniform, uniform, uniform), 0).alpha()) {
            assertEquals(0.2, a, 1e-14);
        }
        Posterior t = new StudentTPosterior(1, 2, 3);
        assertArrayEquals(new double[] {0.5, 0.5}, exact.estimate(List.of(t, t), 0).alpha(), 1e-12);
    }

    @Test
    void armsAgainstUniformsGiveTheMomentsOfTheBeta() {
        // With k independent uniforms U_j (F(x) = x), P(X > max_j U_j) = E[X^k]; for X ~ Beta(a, b),
        // E[X^k] = prod_{r<k} (a + r) / (a + b + r) (moments of the Beta distribution; elementary).
        assertEquals(0.5, alphas(new BetaPosterior(0.5, 0.5), new BetaPosterior(1, 1))[0], 1e-11);
        assertEquals(2.5 * 3.5 / (6.5 * 7.5), alphas(new BetaPosterior(2.5, 4), new BetaPosterior(1, 1),
                new BetaPosterior(1, 1))[0], 1e-13);
        // b < 1: the density is singular at 1, where doubles are coarse; accuracy drops to about 1e-10.
        assertEquals(0.5 * 1.5 / (0.8 * 1.8), alphas(new BetaPosterior(0.5, 0.3), new BetaPosterior(1, 1),
                new BetaPosterior(1, 1))[0], 1e-9);
    }

    @Test
    void nearNormalArmsMatchTheNormalDifference() {
        // For independent normals, P(X > Y) = Phi((mx - my) / sqrt(sx^2 + sy^2)); Student-t with 1e7 degrees
        // of freedom differs from the normal by O(1/nu) (reference: Commons Math NormalDistribution).
        double[] alpha = alphas(new StudentTPosterior(1.0, 0.3, 1e7), new StudentTPosterior(0.2, 0.4, 1e7));
        double expected = new NormalDistribution(null, 0, 1).cumulativeProbability(0.8 / 0.5);
        assertEquals(expected, alpha[0], 1e-6);
    }

    @Test
    void isDeterministicAndIgnoresTheSeed() {
        List<Posterior> ps = List.of(new BetaPosterior(12, 40), new BetaPosterior(15, 37), new BetaPosterior(3, 9));
        ProbabilityBest first = exact.estimate(ps, 1);
        ProbabilityBest second = new ExactProbabilityBest().estimate(ps, 99);
        assertEquals(first, second);
        assertArrayEquals(new double[3], first.standardError());
        assertEquals(ProbabilityBest.Method.EXACT, first.method());
        assertEquals(0, first.draws());
    }

    @Test
    void probabilityWithinMatchesCommonsMathAndAlphaAtZero() {
        // Reference: CommonsMathReference.within (integral f_L(x) prod F_j(x + epsilon) dx).
        List<Posterior> ps = List.of(new BetaPosterior(101, 901), new BetaPosterior(106, 896),
                new BetaPosterior(121, 881), new BetaPosterior(96, 906));
        CommonsMathReference ref = new CommonsMathReference(ps);
        double alpha = exact.estimate(ps, 0).alpha(2);
        assertEquals(alpha, ExactProbabilityBest.probabilityWithin(ps, 2, 0), 1e-12);
        double previous = 0;
        for (double epsilon : new double[] {0, 0.002, 0.01, 0.03}) {
            double within = ExactProbabilityBest.probabilityWithin(ps, 2, epsilon);
            assertEquals(ref.within(2, epsilon), within, 1e-9, "epsilon=" + epsilon);
            assertTrue(within >= previous, "must grow with epsilon");
            previous = within;
        }
        List<Posterior> ts = List.of(new StudentTPosterior(0, 1, 3), new StudentTPosterior(0.3, 0.5, 2.5));
        assertEquals(new CommonsMathReference(ts).within(1, 0.2),
                ExactProbabilityBest.probabilityWithin(ts, 1, 0.2), 1e-9);
    }

    @Test
    void probabilityWithinOfNearNormalArmsMatchesTheNormalDifference() {
        // P(X >= Y - eps) = Phi((mx - my + eps) / sqrt(sx^2 + sy^2)) for independent normals.
        List<Posterior> ps = List.of(new StudentTPosterior(1.0, 0.3, 1e7), new StudentTPosterior(1.2, 0.4, 1e7));
        double expected = new NormalDistribution(null, 0, 1).cumulativeProbability((-0.2 + 0.1) / 0.5);
        assertEquals(expected, ExactProbabilityBest.probabilityWithin(ps, 0, 0.1), 1e-6);
    }

    @Test
    void rejectsBadInput() {
        IllegalArgumentException none = assertThrows(IllegalArgumentException.class,
                () -> exact.estimate(null, 0));
        assertEquals("posteriors must not be null", none.getMessage());
        IllegalArgumentException one = assertThrows(IllegalArgumentException.class,
                () -> exact.estimate(List.of(new BetaPosterior(1, 1)), 0));
        assertEquals("posteriors must hold at least two arms, got 1", one.getMessage());
        IllegalArgumentException nul = assertThrows(IllegalArgumentException.class,
                () -> exact.estimate(Arrays.asList(new BetaPosterior(1, 1), null), 0));
        assertEquals("posterior of arm 1 must not be null", nul.getMessage());
        List<Posterior> two = List.of(new BetaPosterior(1, 1), new BetaPosterior(2, 2));
        IllegalArgumentException leader = assertThrows(IllegalArgumentException.class,
                () -> ExactProbabilityBest.probabilityWithin(two, 2, 0.1));
        assertEquals("leader must be an arm index in [0, 1], got 2", leader.getMessage());
        assertThrows(IllegalArgumentException.class, () -> ExactProbabilityBest.probabilityWithin(two, 0, -0.1));
        assertThrows(IllegalArgumentException.class,
                () -> ExactProbabilityBest.probabilityWithin(two, 0, Double.NaN));
    }
}
