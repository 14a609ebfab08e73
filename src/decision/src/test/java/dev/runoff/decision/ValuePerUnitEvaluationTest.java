package dev.runoff.decision;

import static org.junit.jupiter.api.Assertions.assertEquals;

import dev.runoff.engine.stats.ValueStats;
import dev.runoff.records.avro.ArmState;
import dev.runoff.records.avro.DecisionRecord;
import dev.runoff.records.avro.ExperimentDefinition;
import dev.runoff.records.avro.MetricKind;
import dev.runoff.records.avro.NormalGammaPriorSpec;
import dev.runoff.records.avro.StudentTParams;
import dev.runoff.testkit.TestDefinitions;
import org.junit.jupiter.api.Test;

/**
 * A VALUE_PER_UNIT decision: each arm's capped per-unit sums feed the Normal-Gamma posterior, checked against
 * a hand computation of the conjugate update.
 */
class ValuePerUnitEvaluationTest {

    private static final long NOW = 1_700_000_000_000L;

    private static ExperimentDefinition definition() {
        ExperimentDefinition def = TestDefinitions.value("cabin-upsell", "plain", "bundle");
        def.setVersion(1);
        def.getMetric().setKind(MetricKind.VALUE_PER_UNIT);
        def.getMetric().setValueCap(100.0);
        def.getMetric().setPrior(new NormalGammaPriorSpec(10.0, 2.0, 3.0, 50.0));
        def.getAllocation().setWarmUpTrials(0);
        return def;
    }

    private static ValueStats of(double... values) {
        ValueStats stats = ValueStats.EMPTY;
        for (double v : values) {
            stats = stats.add(v);
        }
        return stats;
    }

    @Test
    void thePosteriorOfEachArmIsTheNormalGammaUpdateOfItsUnitsCappedSums() {
        ExperimentState state = ExperimentState.start(definition())
                .withDelta(0, of(0, 0, 30, 0, 90), 3, NOW - 1)
                .withDelta(1, of(0, 60, 0, 0), 1, NOW - 1);
        DecisionRecord record = new Evaluator(10_000).evaluate(state, NOW).decision();
        Replay.assertReplays(record, null);

        // Hand computation with the conjugate Normal-Gamma update (Murphy 2007, "Conjugate Bayesian analysis
        // of the Gaussian distribution", section 3; the same update is derived by completing the square in
        // Bishop 2006, exercise 2.44) and the Student-t marginal of the mean with 2 alpha_n degrees of freedom,
        // location mu_n and precision alpha_n kappa_n / beta_n (Bishop 2006, eqs. 2.158-2.159):
        //   kappa_n = kappa0 + n, mu_n = (kappa0 mu0 + n xbar) / kappa_n, alpha_n = alpha0 + n / 2,
        //   beta_n = beta0 + M2 / 2 + kappa0 n (xbar - mu0)^2 / (2 kappa_n).
        // Prior mu0 10, kappa0 2, alpha0 3, beta0 50.
        // plain: 5 units, sums 0, 0, 30, 0, 90: xbar 24, M2 = 3 * 24^2 + 6^2 + 66^2 = 6120;
        //   kappa_n 7, mu_n (20 + 120) / 7 = 20, alpha_n 5.5, beta_n 50 + 3060 + 2 * 5 * 14^2 / 14 = 3250.
        assertArm(record.getArms().get(0), 5, 3, 24.0, 6120.0, 20.0, Math.sqrt(3250.0 / (5.5 * 7)), 11.0);
        // bundle: 4 units, sums 0, 60, 0, 0: xbar 15, M2 = 3 * 15^2 + 45^2 = 2700;
        //   kappa_n 6, mu_n (20 + 60) / 6 = 40 / 3, alpha_n 5, beta_n 50 + 1350 + 2 * 4 * 5^2 / 12 = 4250 / 3.
        assertArm(record.getArms().get(1), 4, 1, 15.0, 2700.0, 40.0 / 3, Math.sqrt(4250.0 / 3 / (5.0 * 6)), 10.0);
    }

    private static void assertArm(ArmState arm, long units, long pending, double mean, double m2, double location,
                                  double scale, double dof) {
        assertEquals(units, arm.getTrials(), "a trial is a counted unit");
        assertEquals(pending, arm.getPending(), "units whose window is still open are reported");
        assertEquals(mean, arm.getMean(), 1e-12);
        assertEquals(m2, arm.getM2(), 1e-9);
        StudentTParams posterior = (StudentTParams) arm.getPosterior();
        assertEquals(location, posterior.getLocation(), 1e-12);
        assertEquals(scale, posterior.getScale(), 1e-12);
        assertEquals(dof, posterior.getDegreesOfFreedom(), 0.0);
    }
}
