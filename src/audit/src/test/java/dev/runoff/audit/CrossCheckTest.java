package dev.runoff.audit;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.runoff.engine.best.AdaptiveMonteCarlo;
import dev.runoff.engine.best.ProbabilityBest;
import dev.runoff.engine.posterior.BetaPosterior;
import dev.runoff.engine.posterior.Posterior;
import dev.runoff.records.HashChain;
import dev.runoff.records.avro.ArmState;
import dev.runoff.records.avro.BetaParams;
import dev.runoff.records.avro.DecisionRecord;
import dev.runoff.records.avro.EstimationMethod;
import java.util.ArrayList;
import java.util.List;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;

/** {@code audit verify --cross-check}: Monte Carlo estimates against exact integration. */
class CrossCheckTest {

    private static final List<String> ARMS = List.of("control", "green", "blue");
    private static List<DecisionRecord> chain;

    @BeforeAll
    static void runJob() {
        chain = SimulatedJob.run(SimulatedJob.definition("checkout", ARMS, 0), new double[] {0.04, 0.05, 0.09}, 40,
                600, 11);
    }

    private static ExperimentAudit verify(Verifier verifier, List<DecisionRecord> records) {
        return verifier.verify(Chains.entries(records)).get(0);
    }

    private static long crossCheckFindings(ExperimentAudit audit) {
        return audit.findings().stream().filter(f -> f.check() == Check.CROSS_CHECK).count();
    }

    @Test
    void theJobsDefaultMonteCarloRecordsPassTheCrossCheck() {
        assertTrue(chain.stream().allMatch(r -> r.getMethod() == EstimationMethod.MONTE_CARLO && r.getDraws() > 0),
                "the default definition runs on Monte Carlo");
        ExperimentAudit audit = verify(new Verifier(0.001).withCrossCheck(5), chain);
        assertTrue(audit.passed(), audit.findings().toString());
        assertEquals(chain.size(), audit.reproduced());
    }

    @Test
    void aDeliberatelyBiasedEstimatorIsCaughtAsAFindingOfItsOwnKind() {
        // The biased estimator: the job's own Monte Carlo estimate with 0.02 moved from the leader to the
        // runner-up of each record (an estimator that favours challengers), written into records resealed into
        // a valid chain. With about 10,000 draws the standard errors are at most 0.005, so 0.02 is 4 or more.
        List<DecisionRecord> biased = new ArrayList<>();
        for (DecisionRecord record : chain) {
            biased.add(record.getSequence() > 5 ? biasedCopy(record) : record);
        }
        biased = HashChain.chain(biased);
        ExperimentAudit without = verify(new Verifier(0.001), biased);
        assertEquals(0, crossCheckFindings(without), "off unless asked for");
        ExperimentAudit audit = verify(new Verifier(0.001).withCrossCheck(3), biased);
        java.util.Set<Long> flagged = new java.util.TreeSet<>();
        audit.findings().stream().filter(f -> f.check() == Check.CROSS_CHECK).forEach(f -> flagged.add(f.sequence()));
        java.util.Set<Long> shifted = new java.util.TreeSet<>();
        biased.stream().filter(r -> r.getSequence() > 5).forEach(r -> shifted.add(r.getSequence()));
        assertEquals(shifted, flagged, audit.findings().toString());
        Finding first = audit.findings().stream().filter(f -> f.check() == Check.CROSS_CHECK).findFirst().get();
        assertEquals(6L, first.sequence());
        assertTrue(first.message().contains("standard errors") && first.message().contains("exact"), first.message());
        assertEquals("cross-check", first.check().label());
    }

    @Test
    void anUnbiasedEstimatorWithTheSameDrawsIsNotFlagged() {
        // Control for the test above: the records' alphas replaced by a fresh, unbiased estimate (other seed).
        List<DecisionRecord> fresh = new ArrayList<>();
        for (DecisionRecord record : chain) {
            fresh.add(reestimated(record, 99));
        }
        ExperimentAudit audit = verify(new Verifier(0.001).withCrossCheck(5), HashChain.chain(fresh));
        assertEquals(0, crossCheckFindings(audit), audit.findings().toString());
    }

    @Test
    void sigmasMustBePositive() {
        assertTrue(assertThrows(IllegalArgumentException.class, () -> new Verifier(0.001).withCrossCheck(0))
                .getMessage().contains("sigmas"));
        assertFalse(new Verifier(0.001).withCrossCheck(5).keys().isPresent());
    }

    private static DecisionRecord biasedCopy(DecisionRecord record) {
        DecisionRecord copy = DecisionRecord.newBuilder(record).build();
        List<ArmState> arms = copy.getArms();
        int leader = 0;
        int runnerUp = -1;
        for (int i = 1; i < arms.size(); i++) {
            if (arms.get(i).getAlpha() > arms.get(leader).getAlpha()) {
                leader = i;
            }
        }
        for (int i = 0; i < arms.size(); i++) {
            if (i != leader && (runnerUp < 0 || arms.get(i).getAlpha() > arms.get(runnerUp).getAlpha())) {
                runnerUp = i;
            }
        }
        double shift = Math.min(0.02, arms.get(leader).getAlpha());
        arms.get(leader).setAlpha(arms.get(leader).getAlpha() - shift);
        arms.get(runnerUp).setAlpha(arms.get(runnerUp).getAlpha() + shift);
        return copy;
    }

    private static DecisionRecord reestimated(DecisionRecord record, long seed) {
        DecisionRecord copy = DecisionRecord.newBuilder(record).build();
        List<Posterior> posteriors = copy.getArms().stream()
                .map(a -> (Posterior) new BetaPosterior(((BetaParams) a.getPosterior()).getA(),
                        ((BetaParams) a.getPosterior()).getB())).toList();
        ProbabilityBest pb = new AdaptiveMonteCarlo(copy.getDraws()).estimate(posteriors, seed);
        for (int i = 0; i < copy.getArms().size(); i++) {
            copy.getArms().get(i).setAlpha(pb.alpha(i));
            copy.getArms().get(i).setAlphaStandardError(pb.standardError(i));
        }
        return copy;
    }
}
