package dev.runoff.engine.planning;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.runoff.engine.core.Metric;
import java.util.List;
import org.junit.jupiter.api.Test;

class ArmModelSimulationTest {

    @Test
    void ratesOutsideTheOpenUnitIntervalAreRejectedNamingTheArm() {
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class,
                () -> ArmModel.bernoulli(0.5, 1.0));
        assertEquals("rate of arm2 must be in (0.0, 1.0), got 1.0", e.getMessage());
        assertThrows(IllegalArgumentException.class, () -> ArmModel.bernoulli(0.5));
        assertThrows(IllegalArgumentException.class, () -> ArmModel.gaussianStddevs(new double[] {1, 2}, new double[] {1}));
        assertThrows(IllegalArgumentException.class, () -> ArmModel.gaussianStddevs(new double[] {1, 2}, new double[] {1, 0}));
    }

    @Test
    void wrongPicksAreThoseMoreThanEpsilonBelowTheBest() {
        ArmModel arms = ArmModel.bernoulli(0.5, 0.48, 0.4, 0.5);
        assertTrue(arms.bestIsTied());
        assertFalse(arms.isWrongPick(0, 0));
        assertFalse(arms.isWrongPick(3, 0));
        assertTrue(arms.isWrongPick(1, 0));
        assertFalse(arms.isWrongPick(1, 0.03));
        assertTrue(arms.isWrongPick(2, 0.03));
        assertEquals(List.of("arm1", "arm2", "arm3", "arm4"), arms.names());
    }

    @Test
    void standardDeviationsBecomeTheTrueVariances() {
        ArmModel model = ArmModel.gaussianStddevs(new double[] {1, 2}, new double[] {2, 3});
        assertEquals(Metric.VALUE, model.metric());
        assertEquals(4.0, model.variance(0), 0.0);
        assertEquals(9.0, model.variance(1), 0.0);
        assertEquals(0.21, ArmModel.bernoulli(0.3, 0.7).variance(0), 1e-15);
        assertThrows(IllegalArgumentException.class, () -> ArmModel.bernoulli(0.5, 0.5).best());
    }
}
