package dev.runoff.audit;

import dev.runoff.decision.EstimatedArms;
import dev.runoff.decision.Evidence;
import dev.runoff.records.avro.ArmState;
import dev.runoff.records.avro.BetaParams;
import dev.runoff.records.avro.DecisionRecord;
import dev.runoff.records.avro.EstimationMethod;
import java.util.ArrayList;
import java.util.List;

/**
 * The evidence view of one experiment's decisions ({@link Evidence}): per decision, the evidence against each
 * losing arm and its growth rate; at the last decision, the balance verdict and the rates the planner predicts
 * for the estimated arm rates. For Monte Carlo records of at most {@value Evidence#MAX_EXACT_ARMS} arms the
 * probabilities are recomputed exactly from the posteriors the record states (the integration of
 * {@code audit verify --cross-check}); larger records are read as recorded.
 *
 * @param rows      one row per decision, in the timeline's order
 * @param sequences the decision sequence of each row
 * @param balance   the verdict at the last decision
 * @param reference the predicted rates at the last decision's posterior mean rates (Bernoulli metrics only),
 *                  or {@code null}
 * @param estimatedRates the posterior mean rate per arm of the last decision, or {@code null}
 */
public record EvidenceView(List<Evidence.Row> rows, List<Long> sequences, Evidence.Balance balance,
                           Evidence.Reference reference, double[] estimatedRates) {

    /** Copies the lists. */
    public EvidenceView {
        rows = List.copyOf(rows);
        sequences = List.copyOf(sequences);
        estimatedRates = estimatedRates == null ? null : estimatedRates.clone();
    }

    /**
     * The view of {@code records}, all of one experiment, in the order given.
     *
     * @throws IllegalArgumentException when there are no records
     */
    public static EvidenceView of(List<DecisionRecord> records) {
        if (records.isEmpty()) {
            throw new IllegalArgumentException("no decision records for the evidence view");
        }
        List<Evidence.Snapshot> snapshots = new ArrayList<>(records.size());
        List<Long> sequences = new ArrayList<>(records.size());
        for (DecisionRecord record : records) {
            snapshots.add(snapshot(record));
            sequences.add(record.getSequence());
        }
        List<Evidence.Row> rows = Evidence.of(snapshots);
        DecisionRecord last = records.get(records.size() - 1);
        double[] rates = estimatedRates(last.getArms());
        Evidence.Reference reference = rates == null ? null : Evidence.reference(rates, last.getAllocationBeta());
        return new EvidenceView(rows, sequences, Evidence.balance(rows.get(rows.size() - 1)), reference, rates);
    }

    /** The last decision's row. */
    public Evidence.Row last() {
        return rows.get(rows.size() - 1);
    }

    private static Evidence.Snapshot snapshot(DecisionRecord record) {
        List<ArmState> arms = record.getArms();
        boolean recompute = record.getMethod() == EstimationMethod.MONTE_CARLO
                && arms.size() <= Evidence.MAX_EXACT_ARMS;
        return new Evidence.Snapshot(arms.stream().map(ArmState::getArm).toList(),
                arms.stream().mapToLong(ArmState::getTrials).toArray(),
                arms.stream().mapToDouble(ArmState::getAlpha).toArray(),
                arms.stream().mapToDouble(ArmState::getAlphaStandardError).toArray(), record.getDraws(),
                recompute ? CrossCheck.exact(arms).alpha() : null, EstimatedArms.suspended(arms));
    }

    /** Posterior mean rate a / (a + b) per arm, or {@code null} unless every posterior is a Beta. */
    private static double[] estimatedRates(List<ArmState> arms) {
        double[] rates = new double[arms.size()];
        for (int i = 0; i < rates.length; i++) {
            if (!(arms.get(i).getPosterior() instanceof BetaParams b)) {
                return null;
            }
            rates[i] = b.getA() / (b.getA() + b.getB());
        }
        return rates;
    }
}
