package dev.runoff.decision;

import dev.runoff.records.avro.ExperimentDefinition;
import java.util.List;

/** The weights published once an experiment has stopped, by the definition's {@code afterStop} policy. */
public final class AfterStopWeights {

    private AfterStopWeights() {
    }

    /**
     * The after-stop weights, in the definition's arm order.
     *
     * @param definition  the definition in force at the stop
     * @param winner      the arm the STOP decision named
     * @param lastWeights the weights published before the stop, in the same order, or {@code null} when none
     *                    was published; {@code evaluated} stands in for them then
     * @param evaluated   the weights the stopping evaluation computed (after the guards)
     * @return ALL_TO_WINNER: 1 on the winner; ALL_TO_CONTROL: 1 on the control arm; KEEP_WEIGHTS: the last
     *         published weights
     * @throws IllegalArgumentException when the winner or the control arm is not one of the arms
     */
    public static double[] weights(ExperimentDefinition definition, String winner, double[] lastWeights,
                                   double[] evaluated) {
        List<String> arms = definition.getArms();
        return switch (definition.getAfterStop()) {
            case ALL_TO_WINNER -> oneHot(arms, winner, "winner");
            case ALL_TO_CONTROL -> oneHot(arms, definition.getControlArm(), "control arm");
            case KEEP_WEIGHTS -> (lastWeights != null ? lastWeights : evaluated).clone();
        };
    }

    private static double[] oneHot(List<String> arms, String arm, String what) {
        int index = arms.indexOf(arm);
        if (index < 0) {
            throw new IllegalArgumentException(what + " '" + arm + "' is not one of the arms " + arms);
        }
        double[] weights = new double[arms.size()];
        weights[index] = 1.0;
        return weights;
    }
}
