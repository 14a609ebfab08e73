package dev.runoff.job.pages;

import dev.runoff.engine.planning.ArmModel;
import dev.runoff.engine.planning.OptimalAllocation;
import dev.runoff.engine.planning.TargetAllocation;
import dev.runoff.records.avro.AllocationRule;
import dev.runoff.records.avro.ArmState;
import dev.runoff.records.avro.BetaParams;
import dev.runoff.records.avro.DecisionRecord;
import dev.runoff.records.avro.StoppingRule;
import java.util.List;

/**
 * The planner's prediction of the traffic an experiment still needs, from its latest decision record.
 *
 * <p>Design: the planner's characteristic time {@code T_w(mu)} (Garivier and Kaufmann 2016, Theorem 1)
 * evaluated at the current estimates (a plug-in: posterior means of the rates, or the observed means and
 * sample variances of values), with w the weights the allocation rule tends to: beta-optimal weights for the
 * top-two rules (Russo 2020), the optimal w* for the adaptive rule and equal weights for the uniform rule.
 * A likelihood-ratio statistic (GLR, its heuristic variant, the mixture test) grows like {@code t / T_w}
 * after t trials, and the rule stops when it reaches its threshold (Garivier and Kaufmann 2016, section 3), so
 * the predicted total is {@code T_w} times the current threshold; the leading term {@code log(1/delta)} stands
 * in for the threshold of the other rules, and when it is larger. The remaining traffic is that total less
 * the trials already counted, never below 0: a guide that moves with the estimates, not a promise.
 *
 * @param predictedTotal the predicted total trials, or -1 when there is no prediction
 * @param remaining      the predicted trials still to come, or -1
 * @param note           how the figure was made, or why there is none
 */
record RemainingTraffic(long predictedTotal, long remaining, String note) {

    /** The prediction from {@code record}; a record after STOP needs no more traffic. */
    static RemainingTraffic of(DecisionRecord record) {
        long trials = record.getArms().stream().mapToLong(ArmState::getTrials).sum();
        if (record.getWinner() != null) {
            return new RemainingTraffic(trials, 0, "the experiment has stopped");
        }
        try {
            ArmModel model = model(record.getArms());
            if (model.bestIsTied()) {
                return none("two arms share the best estimate; no prediction until they differ");
            }
            TargetAllocation target = target(record, model);
            double logOneOverDelta = target.predictedTrials(record.getDelta()) / target.characteristicTime();
            boolean byThreshold = likelihoodRatio(record) && record.getThreshold() > logOneOverDelta;
            double total = target.characteristicTime() * (byThreshold ? record.getThreshold() : logOneOverDelta);
            if (!Double.isFinite(total)) {
                return none("the estimates give no finite prediction");
            }
            long predicted = Math.round(total);
            return new RemainingTraffic(predicted, Math.max(0, predicted - trials), (byThreshold
                    ? String.format(java.util.Locale.ROOT, "T_w x the current threshold %.2f", record.getThreshold())
                    : "T_w x log(1/delta) at delta " + record.getDelta()) + ", T_w of "
                    + target.kind().name().toLowerCase(java.util.Locale.ROOT).replace('_', '-')
                    + " weights at the current estimates");
        } catch (IllegalArgumentException e) {
            return none("no prediction from these estimates: " + e.getMessage());
        }
    }

    private static boolean likelihoodRatio(DecisionRecord record) {
        StoppingRule rule = record.getStoppingRule();
        return record.getThreshold() != null && (rule == StoppingRule.GLR || rule == StoppingRule.GLR_HEURISTIC
                || rule == StoppingRule.MIXTURE);
    }

    private static RemainingTraffic none(String why) {
        return new RemainingTraffic(-1, -1, why);
    }

    private static ArmModel model(List<ArmState> arms) {
        double[] means = new double[arms.size()];
        if (arms.get(0).getPosterior() instanceof BetaParams) {
            for (int i = 0; i < means.length; i++) {
                BetaParams p = (BetaParams) arms.get(i).getPosterior();
                means[i] = p.getA() / (p.getA() + p.getB());
            }
            return ArmModel.bernoulli(means);
        }
        double[] variances = new double[means.length];
        for (int i = 0; i < means.length; i++) {
            ArmState arm = arms.get(i);
            if (arm.getTrials() < 2 || arm.getMean() == null || arm.getM2() == null) {
                throw new IllegalArgumentException("arm '" + arm.getArm() + "' has fewer than 2 values");
            }
            means[i] = arm.getMean();
            variances[i] = arm.getM2() / (arm.getTrials() - 1);
        }
        return ArmModel.gaussian(means, variances);
    }

    private static TargetAllocation target(DecisionRecord record, ArmModel model) {
        AllocationRule rule = record.getAllocationRule();
        if (rule == AllocationRule.UNIFORM) {
            return OptimalAllocation.uniform(model);
        }
        if (rule == AllocationRule.TOP_TWO_ADAPTIVE) {
            return OptimalAllocation.optimal(model);
        }
        return OptimalAllocation.betaOptimal(model, record.getAllocationBeta());
    }
}
