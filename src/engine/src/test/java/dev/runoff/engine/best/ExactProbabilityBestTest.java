package dev.runoff.engine.best;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.runoff.engine.posterior.BetaPosterior;
import dev.runoff.engine.posterior.Posterior;
import dev.runoff.engine.posterior.StudentTPosterior;
import java.math.BigDecimal;
import java.math.MathContext;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;
import java.util.SplittableRandom;
import org.apache.commons.math3.distribution.NormalDistribution;
import org.apache.commons.math3.fraction.BigFraction;
import java.util.stream.Stream;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.MethodSource;

/**
 * The exact estimators against outside references: the cases that take an estimator run for engine version
 * 1.2's {@link ExactProbabilityBest} and 1.3's {@link FastExactProbabilityBest} alike, with the same
 * tolerances.
 */
class ExactProbabilityBestTest {

    private final ExactProbabilityBest exact = new ExactProbabilityBest();

    /** The estimators the shared cases run for. */
    static Stream<ProbabilityBestEstimator> estimators() {
        return Stream.of(new ExactProbabilityBest(), new FastExactProbabilityBest());
    }

    private static double[] alphas(ProbabilityBestEstimator estimator, Posterior... posteriors) {
        return estimator.estimate(List.of(posteriors), 0).alpha();
    }

    @ParameterizedTest
    @MethodSource("estimators")
    void reproducesThePublishedWorkedValues(ProbabilityBestEstimator exact) {
        // Cook's recursion (MD Anderson technical report) and Miller (2015), "Formulas for Bayesian A/B
        // Testing": P(Beta(6,6) > Beta(4,8)) = 521/646, P(Beta(4,5) > Beta(2,3)) = 19/33,
        // P(Beta(2,1) > Beta(1,1)) = 2/3. The test implementation of Miller's sum must give them exactly.
        assertEquals(new BigFraction(521, 646), MillerFormula.probabilityBBeatsA(4, 8, 6, 6));
        assertEquals(new BigFraction(19, 33), MillerFormula.probabilityBBeatsA(2, 3, 4, 5));
        assertEquals(new BigFraction(2, 3), MillerFormula.probabilityBBeatsA(1, 1, 2, 1));
        assertEquals(521.0 / 646, alphas(exact, new BetaPosterior(6, 6), new BetaPosterior(4, 8))[0], 1e-14);
        assertEquals(19.0 / 33, alphas(exact, new BetaPosterior(4, 5), new BetaPosterior(2, 3))[0], 1e-14);
        assertEquals(2.0 / 3, alphas(exact, new BetaPosterior(2, 1), new BetaPosterior(1, 1))[0], 1e-14);
    }

    @ParameterizedTest
    @MethodSource("estimators")
    void matchesMillersClosedFormOverAGridOfIntegerParameters(ProbabilityBestEstimator exact) {
        // Reference: Miller (2015) closed form in exact rational arithmetic; both alphas computed directly.
        int[] values = {1, 2, 5, 13, 40};
        double worst = 0;
        for (int aA : values) {
            for (int bA : values) {
                for (int aB : values) {
                    for (int bB : values) {
                        double[] alpha = alphas(exact, new BetaPosterior(aA, bA), new BetaPosterior(aB, bB));
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

    @ParameterizedTest
    @MethodSource("estimators")
    void tinyAlphasAroundOneInATrillionKeepRelativeAccuracy(ProbabilityBestEstimator exact) {
        // Reference: Miller (2015) closed form, exact. P(B > A) is 1e-11..1e-12 in the first four cases and
        // 2e-16 and 3e-19 in the last two (these need the deeper second pass).
        int[][] cases = {{200, 800, 95, 905}, {200, 800, 90, 910}, {30, 10, 2, 38}, {500, 500, 350, 650},
            {60, 940, 3, 997}, {60, 940, 1, 999}};
        for (int[] c : cases) {
            double[] alpha = alphas(exact, new BetaPosterior(c[0], c[1]), new BetaPosterior(c[2], c[3]));
            double expected = MillerFormula.probabilityBBeatsA(c[0], c[1], c[2], c[3]).doubleValue();
            assertTrue(expected < 1e-10 && expected > 1e-20, "case not tiny enough: " + expected);
            assertEquals(expected, alpha[1], 1e-12 * expected, Arrays.toString(c));
        }
    }

    @ParameterizedTest
    @MethodSource("estimators")
    void tinyAlphasDownToOneInTenToTheThreeHundredKeepRelativeAccuracy(ProbabilityBestEstimator exact) {
        // Issue 14, bug 3. Reference: Miller (2015) closed form in exact rational arithmetic, converted with
        // BigDecimal (BigFraction.doubleValue gives 0 below about 1e-308 of its operands' range). P(B > A)
        // for A = Beta(501, 501): 1.795e-188 for B = Beta(1, 1001), 2.294e-65 for B = Beta(151, 851) (these
        // came out 0 and 23% low with a single unchecked retry), and about 1e-95 .. 1e-299 for the others.
        int[][] cases = {{1, 1001}, {151, 851}, {1, 400}, {1, 700}, {1, 1500}, {1, 1900}, {3, 1700}, {40, 3000}};
        for (int[] c : cases) {
            double[] alpha = alphas(exact, new BetaPosterior(501, 501), new BetaPosterior(c[0], c[1]));
            double expected = toDouble(MillerFormula.probabilityBBeatsA(501, 501, c[0], c[1]));
            assertTrue(expected >= 1e-300 && expected < 1e-60, "case not tiny enough: " + expected);
            assertEquals(expected, alpha[1], 1e-9 * expected, Arrays.toString(c));
        }
        assertEquals(1.79479216788302e-188, alphas(exact, new BetaPosterior(501, 501), new BetaPosterior(1, 1001))[1],
                1e-9 * 1.79479216788302e-188);
    }

    @ParameterizedTest
    @MethodSource("estimators")
    void tinyStudentTAlphasKeepRelativeAccuracy(ProbabilityBestEstimator exact) {
        // Issue 14, bug 3, Student-t posteriors. Reference: mpmath 1.3.0 at 40 digits,
        // P(T1 > T2) = sum of quad(f2(x) * S1(x)) over 800 equal pieces of [l1 - 200 s1, l2 + 200 s2] and the two
        // infinite tails (1,600 pieces at 50 digits for the fourth case, whose coarser runs disagreed in the
        // fourth digit), with log f = loggamma((nu+1)/2) - loggamma(nu/2) - log(sqrt(nu pi) s)
        // - (nu+1)/2 log(1 + z^2/nu) and S(x) = betainc(nu/2, 1/2, 0, nu/(nu+z^2), regularized=True)/2 for
        // z = (x - l)/s > 0 (one minus that below). The last case: quad(f1(x) * F2(x)) over 64 pieces of
        // [l1, l2] plus tails at 40 digits, confirmed to 12 digits at 60 digits with 200 pieces.
        double[][] cases = {
            {0, 1, 500, 20, 1, 500, 9.669385007947379498e-42},
            {0, 1, 500, 38, 1, 500, 4.5719412513945097687e-120},
            {0, 1, 30, 60, 1, 30, 9.5437773799056647021e-33},
            {0, 1, 200, 50, 1.5, 100, 1.7302819188080573509e-55},
            {0, 1, 2000, 30, 0.5, 1000, 3.4481994808516508319e-141},
            {0, 1, 500, 60, 1, 500, 2.49999489035693199e-216},
            {0, 1, 5000, 48, 1, 5000, 2.3986052700689534476e-239},
            {0, 1, 20000, 52, 1, 20000, 2.1205825760295168517e-291}};
        for (double[] c : cases) {
            double alpha = alphas(exact, new StudentTPosterior(c[0], c[1], c[2]), new StudentTPosterior(c[3], c[4], c[5]))[0];
            assertEquals(c[6], alpha, 1e-9 * c[6], Arrays.toString(c));
        }
    }

    @ParameterizedTest
    @MethodSource("estimators")
    void smallPriorShapesIntegrateAtBothSingularEnds(ProbabilityBestEstimator exact) {
        // Issue 14, bugs 1 and 2. Prior (0.1, 0.1): arms 0/10 and 0/20 give Beta(0.1, 10.1) and
        // Beta(0.1, 20.1), singular at 0 (integration used to give up); arms 10/10 and 20/20 give
        // Beta(10.1, 0.1) and Beta(20.1, 0.1), singular at 1 (1.2% of the mass was lost); shapes down to 0.03
        // keep the sum of three alphas within 1e-10 of 1 (below 0.03 mass under the smallest double, about
        // (4.9e-324)^shape, is lost: 5e-9 at 0.02, 4e-6 at 0.01, measured). By symmetry
        // theta -> 1 - theta the second pair's alphas are the first pair's swapped. Reference: mpmath 1.3.0
        // at 30 digits, P(u1 < u2) for u1 ~ Beta(0.1, 10.1), u2 ~ Beta(0.1, 20.1), after t = u^0.1, which
        // removes the singularity: quad((1 - t^10)^9.1 * (1 - betainc(0.1, 20.1, 0, t^10, regularized=True))
        // / (0.1 * beta(0.1, 10.1)), [0, 0.5, 0.8, 1]) = 0.468744116060519091543710114562.
        double reference = 0.468744116060519091543710114562;
        double[] atZero = alphas(exact, new BetaPosterior(0.1, 10.1), new BetaPosterior(0.1, 20.1));
        double[] atOne = alphas(exact, new BetaPosterior(10.1, 0.1), new BetaPosterior(20.1, 0.1));
        assertEquals(1 - reference, atZero[0], 1e-12);
        assertEquals(reference, atZero[1], 1e-12);
        assertEquals(reference, atOne[0], 1e-12);
        assertEquals(1 - reference, atOne[1], 1e-12);
        for (double shape : new double[] {0.03, 0.05, 0.1, 0.15, 0.2}) {
            double sum = Arrays.stream(alphas(exact, new BetaPosterior(shape, 10 + shape), new BetaPosterior(shape,
                    20 + shape), new BetaPosterior(5 + shape, shape))).sum();
            assertEquals(1.0, sum, 1e-10, "shape " + shape);
        }
    }

    /** An exact fraction as the nearest double, also below the range where BigFraction.doubleValue works. */
    private static double toDouble(BigFraction f) {
        return new BigDecimal(f.getNumerator()).divide(new BigDecimal(f.getDenominator()), MathContext.DECIMAL64)
                .doubleValue();
    }

    @ParameterizedTest
    @MethodSource("estimators")
    void matchesCommonsMathIntegrationForThreeToSixArms(ProbabilityBestEstimator exact) {
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

    @ParameterizedTest
    @MethodSource("estimators")
    void alphasSumToOneOverManyRandomConfigurations(ProbabilityBestEstimator exact) {
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

    @ParameterizedTest
    @MethodSource("estimators")
    void fiftyArmsOfEitherFamilySumToOne(ProbabilityBestEstimator exact) {
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

    @ParameterizedTest
    @MethodSource("estimators")
    void identicalArmsShareTheProbabilityEqually(ProbabilityBestEstimator exact) {
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

    @ParameterizedTest
    @MethodSource("estimators")
    void armsAgainstUniformsGiveTheMomentsOfTheBeta(ProbabilityBestEstimator exact) {
        // With k independent uniforms U_j (F(x) = x), P(X > max_j U_j) = E[X^k]; for X ~ Beta(a, b),
        // E[X^k] = prod_{r<k} (a + r) / (a + b + r) (moments of the Beta distribution; elementary).
        assertEquals(0.5, alphas(exact, new BetaPosterior(0.5, 0.5), new BetaPosterior(1, 1))[0], 1e-11);
        assertEquals(2.5 * 3.5 / (6.5 * 7.5), alphas(exact, new BetaPosterior(2.5, 4), new BetaPosterior(1, 1),
                new BetaPosterior(1, 1))[0], 1e-13);
        // b < 1: the density is singular at 1, where doubles are coarse; accuracy drops to about 1e-10.
        assertEquals(0.5 * 1.5 / (0.8 * 1.8), alphas(exact, new BetaPosterior(0.5, 0.3), new BetaPosterior(1, 1),
                new BetaPosterior(1, 1))[0], 1e-9);
    }

    @ParameterizedTest
    @MethodSource("estimators")
    void nearNormalArmsMatchTheNormalDifference(ProbabilityBestEstimator exact) {
        // For independent normals, P(X > Y) = Phi((mx - my) / sqrt(sx^2 + sy^2)); Student-t with 1e7 degrees
        // of freedom differs from the normal by O(1/nu) (reference: Commons Math NormalDistribution).
        double[] alpha = alphas(exact, new StudentTPosterior(1.0, 0.3, 1e7), new StudentTPosterior(0.2, 0.4, 1e7));
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
