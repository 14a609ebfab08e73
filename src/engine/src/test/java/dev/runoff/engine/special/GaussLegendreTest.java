package dev.runoff.engine.special;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;

import org.apache.commons.math3.analysis.integration.gauss.GaussIntegrator;
import org.apache.commons.math3.analysis.integration.gauss.GaussIntegratorFactory;
import org.junit.jupiter.api.Test;

class GaussLegendreTest {

    @Test
    void nodesAndWeightsMatchCommonsMath() {
        // Reference: Apache Commons Math 3.6.1 LegendreHighPrecisionRuleFactory (computed in BigDecimal).
        for (int n : new int[] {1, 2, 5, 10, 12, 20}) {
            GaussIntegrator cm = new GaussIntegratorFactory().legendreHighPrecision(n);
            GaussLegendre rule = GaussLegendre.of(n);
            for (int i = 0; i < n; i++) {
                assertEquals(cm.getPoint(i), rule.node(i), 1e-15, "node " + i + " of " + n);
                assertEquals(cm.getWeight(i), rule.weight(i), 1e-15, "weight " + i + " of " + n);
            }
        }
    }

    @Test
    void integratesPolynomialsUpToDegreeTwoNMinusOneExactly() {
        // integral of x^k over [-1, 1] = 2/(k+1) for even k, 0 for odd k; an n-point Gauss rule is exact for
        // degree <= 2n - 1 (Davis and Rabinowitz 1984, "Methods of Numerical Integration", section 2.7).
        GaussLegendre rule = GaussLegendre.of(10);
        for (int k = 0; k <= 19; k++) {
            double sum = 0;
            for (int i = 0; i < rule.size(); i++) {
                sum += rule.weight(i) * Math.pow(rule.node(i), k);
            }
            assertEquals(k % 2 == 0 ? 2.0 / (k + 1) : 0.0, sum, 1e-14, "degree " + k);
        }
    }

    @Test
    void rejectsSizesOutOfRange() {
        assertThrows(IllegalArgumentException.class, () -> GaussLegendre.of(0));
        assertThrows(IllegalArgumentException.class, () -> GaussLegendre.of(65));
    }
}
