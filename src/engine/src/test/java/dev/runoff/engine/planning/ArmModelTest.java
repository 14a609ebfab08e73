package dev.runoff.engine.planning;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.function.Executable;

class ArmModelTest {

    private static String message(Executable e) {
        return assertThrows(IllegalArgumentException.class, e).getMessage();
    }

    @Test
    void rejectsRatesOutsideTheOpenUnitInterval() {
        assertEquals("rate of arm2 must be in (0.0, 1.0), got 1.0", message(() -> ArmModel.bernoulli(0.5, 1.0)));
        assertEquals("rate of arm1 must be in (0.0, 1.0), got 0.0", message(() -> ArmModel.bernoulli(0.0, 0.5)));
        assertEquals("rate of arm3 must be in (0.0, 1.0), got NaN",
                message(() -> ArmModel.bernoulli(0.1, 0.5, Double.NaN)));
    }

    @Test
    void rejectsTwoEqualBestMeansAskingForAnEpsilon() {
        String m = message(() -> ArmModel.bernoulli(0.5, 0.3, 0.5).best());
        assertEquals("arm1 and arm3 share the best mean 0.5: the best arm is not unique, so the optimal allocation"
                + " is undefined; plan with an indifference zone epsilon > 0 instead", m);
        assertTrue(message(() -> ArmModel.gaussianCommonVariance(1, 2.0, 2.0).best()).contains("epsilon"));
    }

    @Test
    void rejectsFewerThanTwoArms() {
        assertEquals("need at least 2 arms, got 1", message(() -> ArmModel.bernoulli(0.5)));
        assertEquals("need at least 2 arms, got 0", message(() -> ArmModel.gaussian(new double[0], new double[0])));
    }

    @Test
    void rejectsBadGaussianParameters() {
        assertEquals("variance of arm2 must be a finite number > 0, got 0.0",
                message(() -> ArmModel.gaussian(new double[] {1, 0}, new double[] {1, 0})));
        assertEquals("variances must have one entry per arm (2), got 1",
                message(() -> ArmModel.gaussian(new double[] {1, 0}, new double[] {1})));
        assertEquals("mean of arm1 must be a finite number, got Infinity",
                message(() -> ArmModel.gaussianCommonVariance(1, Double.POSITIVE_INFINITY, 0)));
    }

    @Test
    void rejectsBadWeightsAndBetas() {
        ArmModel model = ArmModel.bernoulli(0.5, 0.4);
        assertEquals("weights must have one entry per arm (2), got 3",
                message(() -> model.characteristicTime(new double[] {0.3, 0.3, 0.4})));
        assertEquals("weight of arm 1 must be a finite number >= 0, got -0.5",
                message(() -> model.pairwiseCost(new double[] {1.5, -0.5}, 1)));
        assertEquals("arm must be a suboptimal arm index in [0, 2) other than the best arm 0, got 0",
                message(() -> model.pairwiseCost(new double[] {0.5, 0.5}, 0)));
        assertEquals("beta must be in (0.0, 1.0), got 1.0", message(() -> OptimalAllocation.betaOptimal(model, 1)));
        assertEquals("delta must be in (0.0, 1.0), got 0.0",
                message(() -> OptimalAllocation.optimal(model).predictedTrials(0)));
    }

    @Test
    void zeroWeightOnAChallengerMeansInfiniteTime() {
        // Garivier & Kaufmann (2016), Theorem 1: an arm never sampled can never be told apart.
        assertEquals(Double.POSITIVE_INFINITY,
                ArmModel.bernoulli(0.5, 0.4, 0.3).characteristicTime(new double[] {0.5, 0.5, 0}));
    }
}
