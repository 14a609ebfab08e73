package dev.runoff.engine.stopping;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;

import dev.runoff.engine.posterior.BetaPosterior;
import dev.runoff.engine.posterior.Posterior;
import dev.runoff.engine.posterior.StudentTPosterior;
import java.util.List;
import java.util.function.DoubleUnaryOperator;
import org.apache.commons.math3.analysis.integration.IterativeLegendreGaussIntegrator;
import org.apache.commons.math3.distribution.BetaDistribution;
import org.apache.commons.math3.distribution.TDistribution;
import org.junit.jupiter.api.Test;

class LeaderWithinTest {

    @Test
    void withoutIndifferenceItIsTheProbabilityOfBeingBest() {
        // Cook's recursion (MD Anderson technical report), quoted in Miller (2015), "Formulas for Bayesian
        // A/B Testing": P(Beta(6,6) > Beta(4,8)) = 521/646.
        List<Posterior> ps = List.of(new BetaPosterior(6, 6), new BetaPosterior(4, 8));
        assertEquals(521.0 / 646.0, LeaderWithin.probability(ps, 0, 0.0), 1e-10);
    }

    @Test
    void betaArmsMatchCommonsMathIntegration() {
        List<Posterior> ps = List.of(new BetaPosterior(30, 70), new BetaPosterior(33, 67), new BetaPosterior(25, 75));
        BetaDistribution a = new BetaDistribution(30, 70);
        BetaDistribution b = new BetaDistribution(33, 67);
        BetaDistribution c = new BetaDistribution(25, 75);
        double eps = 0.02;
        // P(A >= max(B, C) - eps) = integral f_A(x) F_B(x + eps) F_C(x + eps) dx over [0, 1], with Commons Math's
        // distributions and integrator as the independent reference.
        double reference = integrate(x -> a.density(x) * b.cumulativeProbability(Math.min(1, x + eps))
                * c.cumulativeProbability(Math.min(1, x + eps)), 0, 1);
        assertEquals(reference, LeaderWithin.probability(ps, 0, eps), 1e-8);
    }

    @Test
    void studentTArmsMatchCommonsMathIntegration() {
        StudentTPosterior x = new StudentTPosterior(10.0, 0.5, 12);
        StudentTPosterior y = new StudentTPosterior(10.4, 0.7, 9);
        TDistribution tx = new TDistribution(12);
        TDistribution ty = new TDistribution(9);
        double eps = 0.25;
        // P(X >= Y - eps) = integral f_Y(y) P(X >= y - eps) dy, location-scale t from Commons Math.
        double reference = integrate(v -> ty.density((v - 10.4) / 0.7) / 0.7
                * (1 - tx.cumulativeProbability((v - eps - 10.0) / 0.5)), 0, 20);
        assertEquals(reference, LeaderWithin.probability(List.of(x, y), 0, eps), 1e-7);
    }

    @Test
    void badArgumentsAreRejectedNamingThem() {
        List<Posterior> ps = List.of(new BetaPosterior(1, 1), new BetaPosterior(1, 1));
        assertEquals("leader must be an arm index in [0, 2), got 2",
                assertThrows(IllegalArgumentException.class, () -> LeaderWithin.probability(ps, 2, 0.1)).getMessage());
        assertEquals("epsilon must be finite and >= 0, got NaN",
                assertThrows(IllegalArgumentException.class, () -> LeaderWithin.probability(ps, 0, Double.NaN))
                        .getMessage());
    }

    private static double integrate(DoubleUnaryOperator f, double lo, double hi) {
        return new IterativeLegendreGaussIntegrator(32, 1e-13, 1e-13)
                .integrate(10_000_000, f::applyAsDouble, lo, hi);
    }
}
