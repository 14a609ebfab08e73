package dev.runoff.job.pages;

import dev.runoff.decision.EstimatedArms;
import dev.runoff.decision.Evidence;
import dev.runoff.records.avro.ArmState;
import dev.runoff.records.avro.DecisionRecord;
import java.util.List;

/**
 * What the charts of an experiment page need from one decision record: when, the arms with their published
 * weight and P(best), the trials counted, the stopping statistic with its threshold, and what the evidence
 * view needs (per-arm trials, P(best) with its standard error, the Monte Carlo draws).
 *
 * @param sequence   the record's sequence number in its experiment's chain
 * @param streamTime the record's stream time (ms since the epoch)
 * @param arms       the arms, in the record's order
 * @param weights    each arm's published weight
 * @param alphas     each arm's P(best)
 * @param trials     trials counted over all arms
 * @param statistic  the stopping statistic, or {@code null} when the rule reported none
 * @param threshold  its threshold, or {@code null}
 * @param evidence   the record's numbers as the evidence view reads them, without any recomputation
 */
record DecisionPoint(long sequence, long streamTime, List<String> arms, double[] weights, double[] alphas,
                     long trials, Double statistic, Double threshold, Evidence.Snapshot evidence) {

    /** The point of {@code record}. */
    static DecisionPoint of(DecisionRecord record) {
        List<ArmState> states = record.getArms();
        double[] weights = new double[states.size()];
        double[] alphas = new double[states.size()];
        long trials = 0;
        for (int i = 0; i < states.size(); i++) {
            weights[i] = states.get(i).getWeight();
            alphas[i] = states.get(i).getAlpha();
            trials += states.get(i).getTrials();
        }
        List<String> arms = states.stream().map(ArmState::getArm).toList();
        return new DecisionPoint(record.getSequence(), record.getStreamTime(), arms, weights, alphas, trials,
                record.getStatistic(), record.getThreshold(), new Evidence.Snapshot(arms,
                        states.stream().mapToLong(ArmState::getTrials).toArray(), alphas,
                        states.stream().mapToDouble(ArmState::getAlphaStandardError).toArray(), record.getDraws(),
                        null, EstimatedArms.suspended(states)));
    }

    /** Weight of {@code arm} at this point, or NaN when the arm was not in the experiment then. */
    double weight(String arm) {
        int i = arms.indexOf(arm);
        return i < 0 ? Double.NaN : weights[i];
    }

    /** P(best) of {@code arm} at this point, or NaN when the arm was not in the experiment then. */
    double alpha(String arm) {
        int i = arms.indexOf(arm);
        return i < 0 ? Double.NaN : alphas[i];
    }
}
