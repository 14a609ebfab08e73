package dev.runoff.engine.posterior;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNotEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;

import org.apache.commons.math3.distribution.NormalDistribution;
import org.apache.commons.math3.distribution.TDistribution;
import org.junit.jupiter.api.Test;

class StudentTPosteriorTest {

    @Test
    void matchesCommonsMathInTheBody() {
        // Reference: Apache Commons Math 3.6.1 TDistribution on the standardised value.
        for (double dof : new double[] {1, 2, 2.5, 5, 30, 400}) {
            StudentTPosterior p = new StudentTPosterior(1.5, 0.25, dof);
            TDistribution cm = new TDistribution(null, dof, 1e-14);
            for (double z = -6; z <= 6; z += 0.37) {
                double x = 1.5 + 0.25 * z;
                String what = p + " z=" + z;
                assertEquals(cm.logDensity(z) - Math.log(0.25), p.logDensity(x), 1e-12, what);
                assertEquals(cm.cumulativeProbability(z), Math.exp(p.logCdf(x)), 1e-12, what);
                assertEquals(cm.cumulativeProbability(-z), Math.exp(p.logSurvival(x)), 1e-12, what);
            }
            for (double q = 0.02; q < 1; q += 0.06) {
                assertEquals(1.5 + 0.25 * cm.inverseCumulativeProbability(q), p.quantile(q), 1e-8, p + " q=" + q);
            }
        }
    }

    @Test
    void tailsMatchClosedFormsForOneAndTwoDegreesOfFreedom() {
        // Closed forms (from memory; standard results): nu = 1 (Cauchy) F(z) = atan(1/|z|)/pi for z < 0;
        // nu = 2: F(z) = 1 / ((sqrt(2+z^2) + |z|) sqrt(2+z^2)) for z < 0, written without cancellation.
        StudentTPosterior cauchy = new StudentTPosterior(0, 1, 1);
        StudentTPosterior two = new StudentTPosterior(0, 1, 2);
        for (double z : new double[] {-3, -50, -1e6, -1e12, -1e100}) {
            double cauchyLog = Math.log(Math.atan(1 / -z) / Math.PI);
            assertEquals(cauchyLog, cauchy.logCdf(z), 1e-13 * Math.abs(cauchyLog), "z=" + z);
            assertEquals(cauchyLog, cauchy.logSurvival(-z), 1e-13 * Math.abs(cauchyLog), "z=" + z);
            double r = Math.sqrt(2 + z * z);
            double twoLog = -Math.log(r + -z) - Math.log(r);
            if (Double.isFinite(twoLog)) {
                assertEquals(twoLog, two.logCdf(z), 1e-13 * Math.abs(twoLog), "z=" + z);
            }
        }
    }

    @Test
    void largeDegreesOfFreedomApproachTheNormalTails() {
        // As nu grows the t tends to the normal; at nu = 1e7 the log tail at z = -8 differs from the normal's
        // by about (z^4 + ...)/(4 nu), below 1e-4 (reference: Commons Math NormalDistribution).
        StudentTPosterior p = new StudentTPosterior(0, 1, 1e7);
        NormalDistribution normal = new NormalDistribution(null, 0, 1, 1e-14);
        for (double z : new double[] {-8, -3, 0.5}) {
            double expected = Math.log(normal.cumulativeProbability(z));
            assertEquals(expected, p.logCdf(z), 1e-4 * Math.max(1, Math.abs(expected)), "z=" + z);
            assertEquals(normal.logDensity(z), p.logDensity(z), 1e-4, "z=" + z);
        }
    }

    @Test
    void quantilesInvertTheLogTailsFarOut() {
        StudentTPosterior p = new StudentTPosterior(-2, 3, 4);
        for (double prob : new double[] {1e-200, 1e-20, 0.01, 0.5, 0.9, 1 - 1e-12}) {
            double x = p.quantile(prob);
            double logTail = prob <= 0.5 ? p.logCdf(x) : p.logSurvival(x);
            double target = prob <= 0.5 ? Math.log(prob) : Math.log1p(-prob);
            assertEquals(target, logTail, 1e-10 * Math.max(1, Math.abs(target)), "p=" + prob);
        }
    }

    @Test
    void valueSemanticsAndAccessors() {
        StudentTPosterior p = new StudentTPosterior(1, 2, 3);
        assertEquals(1.0, p.location());
        assertEquals(2.0, p.scale());
        assertEquals(3.0, p.dof());
        assertEquals(new StudentTPosterior(1, 2, 3), p);
        assertEquals(new StudentTPosterior(1, 2, 3).hashCode(), p.hashCode());
        assertNotEquals(new StudentTPosterior(1, 2, 4), p);
        assertEquals("StudentTPosterior[location=1.0, scale=2.0, dof=3.0]", p.toString());
        assertEquals(12.0, p.variance(), 1e-15);
        assertEquals(Double.NaN, new StudentTPosterior(0, 1, 1).mean());
    }

    @Test
    void rejectsBadParameters() {
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class,
                () -> new StudentTPosterior(0, 0, 3));
        assertEquals("Student-t scale must be a finite number > 0, got 0.0", e.getMessage());
        assertThrows(IllegalArgumentException.class, () -> new StudentTPosterior(Double.NaN, 1, 3));
        assertThrows(IllegalArgumentException.class, () -> new StudentTPosterior(0, 1, -2));
    }
}
