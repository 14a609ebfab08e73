package dev.runoff.engine.best;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.runoff.engine.posterior.BetaPosterior;
import dev.runoff.engine.posterior.Posterior;
import dev.runoff.engine.posterior.StudentTPosterior;
import java.util.Arrays;
import java.util.List;
import org.apache.commons.math3.distribution.NormalDistribution;
import org.apache.commons.math3.distribution.TDistribution;
import org.apache.commons.math3.special.Beta;
import org.junit.jupiter.api.Test;

class ExpectedGainTest {

    private static final NormalDistribution STANDARD_NORMAL = new NormalDistribution(null, 0, 1);

    @Test
    void overThresholdMatchesTheBetaClosedForm() {
        // x f_{a,b}(x) = (a/(a+b)) f_{a+1,b}(x) (Beta function identity), hence
        // E[(X - c)^+] = (a/(a+b)) S_{a+1,b}(c) - c S_{a,b}(c); S from Commons Math Beta.regularizedBeta.
        double[][] shapes = {{1, 1}, {2, 5}, {0.5, 0.5}, {31, 971}, {400, 600}};
        for (double[] s : shapes) {
            BetaPosterior p = new BetaPosterior(s[0], s[1]);
            for (double c : new double[] {-0.5, 0.0, 0.01, 0.03, 0.2, 0.4, 0.5, 0.9}) {
                double cc = Math.max(0, Math.min(1, c));
                double sPlus = 1 - Beta.regularizedBeta(cc, s[0] + 1, s[1], 1e-16, 100_000);
                double sSame = 1 - Beta.regularizedBeta(cc, s[0], s[1], 1e-16, 100_000);
                double expected = c < 0 ? p.mean() - c : p.mean() * sPlus - c * sSame;
                assertEquals(expected, ExpectedGain.overThreshold(p, c), 1e-12, p + " c=" + c);
            }
        }
    }

    @Test
    void overThresholdMatchesTheStudentTClosedForm() {
        // For the standard t: integral_z^inf t f(t) dt = (nu + z^2) f(z) / (nu - 1) (differentiate the
        // right side), so E[(X - c)^+] = s [(nu + z^2) f(z) / (nu - 1) - z S(z)], z = (c - m)/s.
        // f and S from Commons Math TDistribution.
        for (double dof : new double[] {1.5, 2.2, 4, 30, 1000}) {
            StudentTPosterior p = new StudentTPosterior(2, 0.5, dof);
            TDistribution t = new TDistribution(null, dof, 1e-15);
            for (double c : new double[] {-3, 1, 2, 2.7, 5}) {
                double z = (c - 2) / 0.5;
                double expected = 0.5 * ((dof + z * z) * t.density(z) / (dof - 1)
                        - z * (1 - t.cumulativeProbability(z)));
                assertEquals(expected, ExpectedGain.overThreshold(p, c), 1e-10 * Math.max(1, expected),
                        p + " c=" + c);
            }
        }
    }

    @Test
    void overThresholdFarInTheTailKeepsRelativeAccuracy() {
        // Beta(1, n): S(x) = (1-x)^n, so E[(X - c)^+] = (1-c)^(n+1) / (n+1) exactly (integral of S).
        BetaPosterior p = new BetaPosterior(1, 200);
        for (double c : new double[] {0.01, 0.2, 0.5}) {
            double expected = Math.exp(201 * Math.log1p(-c)) / 201;
            assertEquals(expected, ExpectedGain.overThreshold(p, c), 1e-11 * expected, "c=" + c);
        }
    }

    @Test
    void pairwiseOfNearNormalArmsMatchesTheRectifiedNormalMean() {
        // D = X - Y ~ Normal(m, s^2): E[D^+] = s phi(m/s) + m Phi(m/s) (mean of a rectified normal);
        // Student-t with 1e7 degrees of freedom is normal up to O(1/nu).
        double[][] cases = {{1.0, 0.3, 0.2, 0.4}, {0.0, 1.0, 0.0, 1.0}, {-2, 0.5, 0.0, 0.5}};
        for (double[] c : cases) {
            Posterior x = new StudentTPosterior(c[0], c[1], 1e7);
            Posterior y = new StudentTPosterior(c[2], c[3], 1e7);
            double m = c[0] - c[2];
            double s = Math.hypot(c[1], c[3]);
            double expected = s * STANDARD_NORMAL.density(m / s) + m * STANDARD_NORMAL.cumulativeProbability(m / s);
            assertEquals(expected, ExpectedGain.pairwise(x, y), 1e-6 * Math.max(expected, 1e-3),
                    Arrays.toString(c));
        }
    }

    @Test
    void pairwiseMatchesCommonsMathIntegration() {
        // Reference: integral S_x(t) F_y(t) dt by CommonsMathReference (value of arm 0 in a pair).
        List<List<Posterior>> pairs = List.of(
                List.of(new BetaPosterior(6, 6), new BetaPosterior(4, 8)),
                List.of(new BetaPosterior(11, 991), new BetaPosterior(25, 977)),
                List.of(new BetaPosterior(1, 1), new BetaPosterior(1, 30)),
                List.of(new StudentTPosterior(0, 1, 3), new StudentTPosterior(0.5, 2, 2.5)),
                List.of(new StudentTPosterior(10, 0.1, 50), new StudentTPosterior(9, 3, 4)));
        for (List<Posterior> pair : pairs) {
            double expected = new CommonsMathReference(pair).value(0);
            assertEquals(expected, ExpectedGain.pairwise(pair.get(0), pair.get(1)), 1e-9, pair.toString());
        }
    }

    @Test
    void pairwiseGainsDifferByTheDifferenceOfMeans() {
        // (X - Y)^+ - (Y - X)^+ = X - Y, so E[(X-Y)^+] - E[(Y-X)^+] = E[X] - E[Y] (exact identity).
        List<Posterior[]> pairs = List.of(
                new Posterior[] {new BetaPosterior(3, 9), new BetaPosterior(40, 60)},
                new Posterior[] {new BetaPosterior(0.5, 0.5), new BetaPosterior(2, 1)},
                new Posterior[] {new StudentTPosterior(0, 1, 2.5), new StudentTPosterior(1, 0.3, 2.1)});
        for (Posterior[] p : pairs) {
            double difference = ExpectedGain.pairwise(p[0], p[1]) - ExpectedGain.pairwise(p[1], p[0]);
            assertEquals(p[0].mean() - p[1].mean(), difference, 1e-10, Arrays.toString(p));
        }
    }

    @Test
    void valueOfBeingBestMatchesCommonsMathIntegration() {
        List<List<Posterior>> cases = List.of(
                List.of(new BetaPosterior(101, 901), new BetaPosterior(106, 896), new BetaPosterior(111, 891),
                        new BetaPosterior(96, 906)),
                List.of(new BetaPosterior(1, 1), new BetaPosterior(2, 1), new BetaPosterior(1, 3)),
                List.of(new StudentTPosterior(0, 1, 2.5), new StudentTPosterior(0.5, 1, 3),
                        new StudentTPosterior(1, 2, 6)));
        for (List<Posterior> ps : cases) {
            double[] values = ExpectedGain.valueOfBeingBest(ps);
            CommonsMathReference ref = new CommonsMathReference(ps);
            for (int i = 0; i < ps.size(); i++) {
                assertEquals(ref.value(i), values[i], 1e-9, ps + " arm " + i);
                assertTrue(values[i] > 0);
            }
        }
    }

    @Test
    void valueOfBeingBestOfTwoArmsIsThePairwiseGain() {
        Posterior x = new BetaPosterior(20, 80);
        Posterior y = new BetaPosterior(25, 75);
        double[] values = ExpectedGain.valueOfBeingBest(List.of(x, y));
        assertEquals(ExpectedGain.pairwise(x, y), values[0], 1e-15);
        assertEquals(ExpectedGain.pairwise(y, x), values[1], 1e-15);
    }

    @Test
    void rejectsBadInput() {
        IllegalArgumentException cauchy = assertThrows(IllegalArgumentException.class,
                () -> ExpectedGain.overThreshold(new StudentTPosterior(0, 1, 1), 0));
        assertTrue(cauchy.getMessage().contains("finite posterior mean: arm 0"), cauchy.getMessage());
        assertThrows(IllegalArgumentException.class, () -> ExpectedGain.overThreshold(null, 0));
        assertThrows(IllegalArgumentException.class,
                () -> ExpectedGain.overThreshold(new BetaPosterior(1, 1), Double.NaN));
        IllegalArgumentException y = assertThrows(IllegalArgumentException.class,
                () -> ExpectedGain.pairwise(new BetaPosterior(1, 1), null));
        assertEquals("posterior y must not be null", y.getMessage());
        assertThrows(IllegalArgumentException.class,
                () -> ExpectedGain.valueOfBeingBest(List.of(new BetaPosterior(1, 1))));
        assertThrows(IllegalArgumentException.class, () -> ExpectedGain.valueOfBeingBest(null));
        assertThrows(IllegalArgumentException.class, () -> ExpectedGain.valueOfBeingBest(
                List.of(new BetaPosterior(1, 1), new StudentTPosterior(0, 1, 0.5))));
    }
}
