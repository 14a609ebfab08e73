package dev.runoff.engine.best;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.runoff.engine.posterior.BetaPosterior;
import dev.runoff.engine.posterior.Posterior;
import dev.runoff.engine.posterior.StudentTPosterior;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.Collections;
import java.util.List;
import org.apache.commons.math3.analysis.UnivariateFunction;
import org.apache.commons.math3.analysis.integration.IterativeLegendreGaussIntegrator;
import org.apache.commons.math3.distribution.BetaDistribution;
import org.apache.commons.math3.distribution.TDistribution;
import org.apache.commons.math3.special.Beta;
import org.apache.commons.rng.UniformRandomProvider;
import org.junit.jupiter.api.Test;

/**
 * Checks the Monte Carlo estimate against a published closed form and against independent numerical
 * integration with Apache Commons Math. Seeds are fixed; every statistical comparison allows 4 standard
 * errors of the true value, {@code sqrt(alpha (1 - alpha) / M)} (a false alarm about 6e-5 per comparison
 * for a correct estimator, by the normal approximation).
 */
class MonteCarloProbabilityBestTest {
    private static final int DRAWS = 200_000;
    private static final long SEED = 20_240_611L;
    /** Probability mass left out at each end of the integration range. */
    private static final double TAIL = 1e-10;

    private static List<BetaPosterior> betas(double... ab) {
        List<BetaPosterior> list = new ArrayList<>();
        for (int i = 0; i < ab.length; i += 2) {
            list.add(new BetaPosterior(ab[i], ab[i + 1]));
        }
        return list;
    }

    /**
     * Miller (2015), "Formulas for Bayesian A/B Testing": for integer alpha_B,
     * {@code P(p_B > p_A) = sum_{i=0}^{alpha_B - 1} B(alpha_A + i, beta_A + beta_B)
     * / ((beta_B + i) B(1 + i, beta_B) B(alpha_A, beta_A))}, summed here in log space.
     */
    static double millerProbabilityBGreater(int alphaA, int betaA, int alphaB, int betaB) {
        double total = 0;
        for (int i = 0; i < alphaB; i++) {
            total += StrictMath.exp(Beta.logBeta(alphaA + i, betaA + betaB) - StrictMath.log(betaB + i)
                    - Beta.logBeta(1 + i, betaB) - Beta.logBeta(alphaA, betaA));
        }
        return total;
    }

    /**
     * Asserts {@code |estimate - truth| <= 4 sqrt(truth (1 - truth) / M) + truthError} for every arm, where
     * {@code truthError} bounds the error of the reference value itself.
     */
    private static void assertWithinFourStandardErrors(double[] truth, ProbabilityBest estimate,
                                                       double truthError) {
        for (int i = 0; i < truth.length; i++) {
            double se = StrictMath.sqrt(truth[i] * (1 - truth[i]) / estimate.draws());
            assertEquals(truth[i], estimate.alpha(i), 4 * se + truthError, "alpha of arm " + i + " in " + estimate);
        }
    }

    @Test
    void millerClosedFormReproducesCooksPublishedValues() {
        // Cook, "Exact calculation of beta inequalities", MD Anderson technical report (values as quoted in
        // the project design brief): P(Beta(6,6) > Beta(4,8)) = 521/646, P(Beta(4,5) > Beta(2,3)) = 19/33,
        // P(Beta(2,1) > Beta(1,1)) = 2/3. This checks the test's own formula before it is used as a truth.
        assertEquals(521.0 / 646.0, millerProbabilityBGreater(4, 8, 6, 6), 1e-13);
        assertEquals(19.0 / 33.0, millerProbabilityBGreater(2, 3, 4, 5), 1e-13);
        assertEquals(2.0 / 3.0, millerProbabilityBGreater(1, 1, 2, 1), 1e-13);
    }

    @Test
    void twoArmsMatchMillerClosedFormForBeta66AgainstBeta48() {
        // Miller (2015) closed form; 521/646 from Cook's MD Anderson technical report.
        ProbabilityBest p = new MonteCarloProbabilityBest(DRAWS).estimate(betas(4, 8, 6, 6), SEED);
        double truth = 521.0 / 646.0;
        assertWithinFourStandardErrors(new double[] {1 - truth, truth}, p, 1e-12);
    }

    @Test
    void twoArmsMatchMillerClosedFormForThousandTrialPosteriors() {
        // Miller (2015) closed form with integer parameters from 1,000 trials each (uniform prior).
        ProbabilityBest p = new MonteCarloProbabilityBest(DRAWS).estimate(betas(121, 881, 131, 871), SEED);
        double truth = millerProbabilityBGreater(121, 881, 131, 871);
        assertWithinFourStandardErrors(new double[] {1 - truth, truth}, p, 1e-12);
    }

    /**
     * Independent reference: {@code alpha_i = integral f_i(x) prod_{j != i} F_j(x) dx} with Commons Math
     * densities and CDFs and its IterativeLegendreGaussIntegrator, over pieces cut at every arm's quantiles
     * so that each piece is smooth at the integrator's scale. The range runs from the lowest {@link #TAIL}
     * quantile to the highest {@code 1 - TAIL} quantile, so each alpha misses at most {@code 2 TAIL}.
     */
    static double[] integratedAlpha(List<Reference> arms) {
        double[] alpha = new double[arms.size()];
        for (int i = 0; i < alpha.length; i++) {
            alpha[i] = integrate(arms, i, quantileCuts(arms, Double.POSITIVE_INFINITY), false);
        }
        return alpha;
    }

    /**
     * The same for Beta arms, with the half above 1/2 integrated in {@code y = 1 - x}, where arm j is
     * Beta(b_j, a_j) and {@code F_j(x) = 1 - G_j(y)}: next to 1 the variable x itself has too few doubles to
     * resolve a density with a shape below 1.
     */
    static double[] integratedBetaAlpha(List<BetaPosterior> posteriors) {
        List<Reference> lower = posteriors.stream().map(p -> Reference.beta(p.a(), p.b())).toList();
        List<Reference> upper = posteriors.stream().map(p -> Reference.beta(p.b(), p.a())).toList();
        double[] alpha = new double[posteriors.size()];
        for (int i = 0; i < alpha.length; i++) {
            alpha[i] = integrate(lower, i, quantileCuts(lower, 0.5), false)
                    + integrate(upper, i, quantileCuts(upper, 0.5), true);
        }
        return alpha;
    }

    /** Integral of {@code f_i prod_{j != i} F_j} (or {@code 1 - F_j} if {@code survival}) over the cuts. */
    private static double integrate(List<Reference> arms, int i, double[] cuts, boolean survival) {
        IterativeLegendreGaussIntegrator integrator = new IterativeLegendreGaussIntegrator(5, 1e-10, 1e-13);
        UnivariateFunction integrand = x -> {
            double value = arms.get(i).density(x);
            for (int j = 0; j < arms.size(); j++) {
                if (j != i) {
                    value *= survival ? 1 - arms.get(j).cdf(x) : arms.get(j).cdf(x);
                }
            }
            return value;
        };
        double total = 0;
        for (int c = 0; c + 1 < cuts.length; c++) {
            total += integrator.integrate(1_000_000, integrand, cuts[c], cuts[c + 1]);
        }
        return total;
    }

    /**
     * Every arm's quantiles at fixed levels, sorted, those above {@code end} replaced by {@code end}. The tail
     * levels step by decades, so that a density with a shape below 1 changes little within one piece.
     */
    private static double[] quantileCuts(List<Reference> arms, double end) {
        List<Double> levels = new ArrayList<>(List.of(0.05, 0.2, 0.35, 0.5, 0.65, 0.8, 0.95));
        for (double p = TAIL; p < 0.05; p *= 10) {
            levels.add(p);
            levels.add(1 - p);
        }
        List<Double> cuts = new ArrayList<>();
        for (Reference arm : arms) {
            for (double level : levels) {
                cuts.add(Math.min(end, arm.quantile(level)));
            }
        }
        Collections.sort(cuts);
        return cuts.stream().distinct().mapToDouble(Double::doubleValue).toArray();
    }

    private static void assertMatchesIntegration(List<? extends Posterior> posteriors, double[] truth) {
        // The reference itself must be a probability vector (sanity check of the integration).
        assertEquals(1.0, Arrays.stream(truth).sum(), 1e-8, "integrated alphas " + Arrays.toString(truth));
        ProbabilityBest p = new MonteCarloProbabilityBest(DRAWS).estimate(posteriors, SEED);
        assertWithinFourStandardErrors(truth, p, 1e-8);
    }

    @Test
    void threeBetaArmsMatchCommonsMathIntegration() {
        List<BetaPosterior> posteriors = betas(3, 7, 4, 6, 2.5, 5.5);
        assertMatchesIntegration(posteriors, integratedBetaAlpha(posteriors));
    }

    @Test
    void fourBetaArmsWithShapesBelowOneMatchCommonsMathIntegration() {
        List<BetaPosterior> posteriors = betas(0.5, 0.8, 0.7, 0.5, 1.5, 2, 0.9, 0.9);
        assertMatchesIntegration(posteriors, integratedBetaAlpha(posteriors));
    }

    @Test
    void fiveBetaArmsOnThousandTrialsMatchCommonsMathIntegration() {
        // Rates 0.10 .. 0.14 on 1,000 trials each under a uniform prior.
        List<BetaPosterior> posteriors = betas(101, 901, 111, 891, 121, 881, 131, 871, 141, 861);
        assertMatchesIntegration(posteriors, integratedBetaAlpha(posteriors));
    }

    @Test
    void fourStudentTArmsMatchCommonsMathIntegration() {
        List<StudentTPosterior> posteriors = List.of(new StudentTPosterior(0.0, 1.0, 5),
                new StudentTPosterior(0.3, 1.2, 8), new StudentTPosterior(0.5, 2.0, 3),
                new StudentTPosterior(-0.2, 0.5, 30));
        assertMatchesIntegration(posteriors, integratedAlpha(posteriors.stream()
                .map(p -> Reference.studentT(p.location(), p.scale(), p.dof())).toList()));
    }

    @Test
    void sameSeedGivesIdenticalResult() {
        MonteCarloProbabilityBest estimator = new MonteCarloProbabilityBest(5_000);
        List<BetaPosterior> posteriors = betas(10, 90, 12, 88, 0.5, 3);
        ProbabilityBest first = estimator.estimate(posteriors, 42);
        ProbabilityBest second = estimator.estimate(posteriors, 42);
        assertTrue(Arrays.equals(first.alpha(), second.alpha()), first + " vs " + second);
        assertTrue(Arrays.equals(first.standardError(), second.standardError()), first + " vs " + second);
    }

    @Test
    void differentSeedGivesDifferentAlpha() {
        MonteCarloProbabilityBest estimator = new MonteCarloProbabilityBest(5_000);
        List<BetaPosterior> posteriors = betas(10, 90, 12, 88, 11, 89);
        assertFalse(Arrays.equals(estimator.estimate(posteriors, 42).alpha(),
                estimator.estimate(posteriors, 43).alpha()));
    }

    @Test
    void reportsMethodDrawsAndBinomialStandardError() {
        // Standard error of a binomial proportion, sqrt(p (1 - p) / M): common practice.
        ProbabilityBest p = new MonteCarloProbabilityBest(3_001).estimate(betas(4, 8, 6, 6, 5, 7), 9);
        assertEquals(ProbabilityBest.Method.MONTE_CARLO, p.method());
        assertEquals(3_001, p.draws());
        long counted = 0;
        for (int i = 0; i < p.size(); i++) {
            double count = p.alpha(i) * 3_001;
            assertEquals(StrictMath.rint(count), count, 1e-9, "alpha * M is a whole count");
            counted += StrictMath.round(count);
            assertEquals(StrictMath.sqrt(p.alpha(i) * (1 - p.alpha(i)) / 3_001), p.standardError(i));
        }
        assertEquals(3_001, counted);
    }

    @Test
    void singleDrawCreditsExactlyOneArm() {
        ProbabilityBest p = new MonteCarloProbabilityBest(1).estimate(betas(1, 1, 1, 1, 1, 1), 3);
        assertEquals(1.0, Arrays.stream(p.alpha()).sum());
        assertEquals(1L, Arrays.stream(p.alpha()).filter(a -> a == 1.0).count());
    }

    @Test
    void tiesGoToTheLowestArmIndex() {
        List<Posterior> posteriors = List.of(new Constant(0.2), new Constant(0.7), new Constant(0.7),
                new Constant(0.1));
        ProbabilityBest p = new MonteCarloProbabilityBest(2_500).estimate(posteriors, 1);
        assertEquals(List.of(0.0, 1.0, 0.0, 0.0), Arrays.stream(p.alpha()).boxed().toList());
    }

    @Test
    void rejectsDrawsBelowOne() {
        IllegalArgumentException zero = assertThrows(IllegalArgumentException.class,
                () -> new MonteCarloProbabilityBest(0));
        assertTrue(zero.getMessage().contains("draws") && zero.getMessage().contains("0"), zero.getMessage());
        IllegalArgumentException negative = assertThrows(IllegalArgumentException.class,
                () -> new MonteCarloProbabilityBest(-7));
        assertTrue(negative.getMessage().contains("-7"), negative.getMessage());
    }

    @Test
    void rejectsFewerThanTwoPosteriors() {
        MonteCarloProbabilityBest estimator = new MonteCarloProbabilityBest(100);
        IllegalArgumentException one = assertThrows(IllegalArgumentException.class,
                () -> estimator.estimate(betas(1, 1), 1));
        assertTrue(one.getMessage().contains("got 1"), one.getMessage());
        assertThrows(IllegalArgumentException.class, () -> estimator.estimate(List.of(), 1));
        assertThrows(IllegalArgumentException.class, () -> estimator.estimate(null, 1));
    }

    @Test
    void rejectsNullPosteriorNamingTheArm() {
        List<BetaPosterior> posteriors = new ArrayList<>(betas(1, 1, 2, 2));
        posteriors.add(null);
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class,
                () -> new MonteCarloProbabilityBest(100).estimate(posteriors, 1));
        assertTrue(e.getMessage().contains("arm 2"), e.getMessage());
    }

    /** Density, CDF and quantile of one arm's reference distribution. */
    private interface Reference {
        double density(double x);

        double cdf(double x);

        double quantile(double p);

        /** Commons Math Beta distribution. */
        static Reference beta(double a, double b) {
            BetaDistribution d = new BetaDistribution(null, a, b, 1e-300);
            return new Reference() {
                public double density(double x) {
                    return d.density(x);
                }

                public double cdf(double x) {
                    return d.cumulativeProbability(x);
                }

                public double quantile(double p) {
                    return d.inverseCumulativeProbability(p);
                }
            };
        }

        /** Commons Math Student-t, shifted by {@code location} and scaled by {@code scale}. */
        static Reference studentT(double location, double scale, double dof) {
            TDistribution d = new TDistribution(null, dof, 1e-300);
            return new Reference() {
                public double density(double x) {
                    return d.density((x - location) / scale) / scale;
                }

                public double cdf(double x) {
                    return d.cumulativeProbability((x - location) / scale);
                }

                public double quantile(double p) {
                    return location + scale * d.inverseCumulativeProbability(p);
                }
            };
        }
    }

    /** A point mass, to make ties certain. Only its sampler is used. */
    private record Constant(double value) implements Posterior {
        @Override
        public double mean() {
            return value;
        }

        @Override
        public double variance() {
            return 0;
        }

        @Override
        public double supportLower() {
            return value;
        }

        @Override
        public double supportUpper() {
            return value;
        }

        @Override
        public double logDensity(double x) {
            throw new UnsupportedOperationException("point mass");
        }

        @Override
        public double logCdf(double x) {
            return x >= value ? 0.0 : Double.NEGATIVE_INFINITY;
        }

        @Override
        public double logSurvival(double x) {
            return x >= value ? Double.NEGATIVE_INFINITY : 0.0;
        }

        @Override
        public double quantile(double p) {
            return value;
        }

        @Override
        public Sampler sampler(UniformRandomProvider rng) {
            return () -> value;
        }
    }
}
