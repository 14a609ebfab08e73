package dev.runoff.demo;

import dev.runoff.engine.planning.ArmModel;
import dev.runoff.engine.planning.OptimalAllocation;
import dev.runoff.engine.planning.SimulationResult;
import dev.runoff.records.avro.ArmState;
import dev.runoff.records.avro.DecisionRecord;
import java.nio.file.Path;
import java.util.List;

/**
 * How a demo run ended.
 *
 * @param last              the last decision record (a STOP unless the demo gave up)
 * @param periods           decision records seen
 * @param elapsedMs         wall time from the first weights to the last decision
 * @param traffic           what the serving tier served: visitors, visits, returning visits, switches, bookings
 * @param trueBest          the layout with the highest hidden rate
 * @param rates             the hidden rates, in arm order
 * @param predictedUniform  planner prediction of the trials a uniform split needs at the run's delta
 * @param predictedOptimal  the same for the optimal allocation
 * @param predictedTopTwo   the same for the beta-optimal allocation with beta 1/2 (the top-two target)
 * @param simulated         the planner's simulation of the same experiment (the demo's rule and a uniform
 *                          split, same rates, delta and threshold), or {@code null} when it was not ready
 * @param chainIntact       whether the hash chain of the decision records verified
 * @param decisionsTopic    where the job wrote the decision records
 * @param exported          file the records were exported to, or {@code null}
 */
public record DemoSummary(DecisionRecord last, int periods, long elapsedMs, Traffic traffic, String trueBest,
                          double[] rates, double predictedUniform, double predictedOptimal, double predictedTopTwo,
                          SimulationResult simulated, boolean chainIntact, String decisionsTopic, Path exported) {

    /**
     * What the demo's serving tier did.
     *
     * @param visitors              distinct visitors served (some may not be counted in the last decision yet)
     * @param visits                visits served, returning ones included
     * @param returningVisits       visits by visitors who came before
     * @param switchedWhileWeighted returning visits served another layout than the visitor's previous one while
     *                              that layout still had weight (sticky assignment promises 0)
     * @param keptPicks             returning visits the sticky assigner kept on a layout that the table's
     *                              draw from the current weights alone would have changed
     * @param bookingsSent          bookings sent (inside or after the conversion window)
     */
    public record Traffic(long visitors, long visits, long returningVisits, long switchedWhileWeighted,
                          long keptPicks, long bookingsSent) {
    }

    /** Copies the rates. */
    public DemoSummary {
        rates = rates.clone();
    }

    @Override
    public double[] rates() {
        return rates.clone();
    }

    /** Whether the experiment ended with a STOP. */
    public boolean stopped() {
        return last != null && "STOP".equals(last.getDecision().name());
    }

    /** The winner named by the STOP, or {@code null}. */
    public String winner() {
        return stopped() ? last.getWinner() : null;
    }

    /** Trials the job counted at the last decision, over all arms. */
    public long trials() {
        return last == null ? 0 : last.getArms().stream().mapToLong(ArmState::getTrials).sum();
    }

    /** Visitors sent: distinct visitors served. */
    public long visitorsSent() {
        return traffic.visitors();
    }

    /**
     * Units the last decision knew of but had not counted yet, their conversion windows still open (the
     * decision record's pending counts, over all arms; 0 without a record or under per-exposure counting).
     */
    public long pendingAtLast() {
        return last == null ? 0 : last.getArms().stream().mapToLong(a -> a.getPending() == null ? 0 : a.getPending())
                .sum();
    }

    /** Trials of the winner at the last decision (0 without a winner). */
    public long winnerTrials() {
        return !stopped() ? 0 : last.getArms().stream().filter(a -> a.getArm().equals(last.getWinner()))
                .mapToLong(ArmState::getTrials).sum();
    }

    /** Posterior probability that the winner is best, at the last decision ({@code NaN} without a winner). */
    public double winnerProbability() {
        if (!stopped()) {
            return Double.NaN;
        }
        return last.getArms().stream().filter(a -> a.getArm().equals(last.getWinner()))
                .mapToDouble(ArmState::getAlpha).findFirst().orElse(Double.NaN);
    }

    /**
     * The planner's predictions for {@code rates} at {@code delta}: uniform, optimal and top-two (beta 1/2)
     * targets, each {@code T*(w) log(1/delta)} (Garivier and Kaufmann 2016, Theorem 1: the leading term as
     * delta goes to 0; a real stopping rule needs more at a finite delta).
     */
    static double[] predictions(double[] rates, double delta) {
        ArmModel model = ArmModel.bernoulli(rates);
        return new double[] {OptimalAllocation.uniform(model).predictedTrials(delta),
            OptimalAllocation.optimal(model).predictedTrials(delta),
            OptimalAllocation.betaOptimal(model, 0.5).predictedTrials(delta)};
    }

    /** The arm names of the run. */
    public List<String> arms() {
        return last == null ? List.of() : last.getDefinition().getArms();
    }
}
