package dev.runoff.records;

import dev.runoff.records.avro.AfterStopPolicy;
import dev.runoff.records.avro.AllocationRule;
import dev.runoff.records.avro.AllocationSpec;
import dev.runoff.records.avro.AllocationUpdate;
import dev.runoff.records.avro.ArmState;
import dev.runoff.records.avro.ArmWeight;
import dev.runoff.records.avro.BetaParams;
import dev.runoff.records.avro.Decision;
import dev.runoff.records.avro.DecisionRecord;
import dev.runoff.records.avro.EstimationMethod;
import dev.runoff.records.avro.EventType;
import dev.runoff.records.avro.ExperimentDefinition;
import dev.runoff.records.avro.ExperimentStatus;
import dev.runoff.records.avro.Guard;
import dev.runoff.records.avro.MetricKind;
import dev.runoff.records.avro.MetricSpec;
import dev.runoff.records.avro.NormalGammaPriorSpec;
import dev.runoff.records.avro.OutcomeEvent;
import dev.runoff.records.avro.StoppingRule;
import dev.runoff.records.avro.StoppingSpec;
import dev.runoff.records.avro.StudentTParams;
import java.util.List;

/** Valid records of every type, built fresh on each call so tests may change them. */
final class Samples {

    /** 2023-11-14T22:13:20Z, the "current time" of the tests. */
    static final long NOW = 1_700_000_000_000L;

    private Samples() {
    }

    static OutcomeEvent click() {
        return OutcomeEvent.newBuilder()
                .setExperimentId("checkout-button")
                .setUnitId("u-5f1d3a")
                .setEventId("ev-0001")
                .setType(EventType.CLICK)
                .setTimestamp(NOW - 1_000)
                .setArm("green")
                .build();
    }

    static OutcomeEvent value() {
        return OutcomeEvent.newBuilder(click()).setType(EventType.VALUE).setArm(null).setValue(12.5).build();
    }

    /** A BERNOULLI definition with every optional field set. */
    static ExperimentDefinition bernoulli() {
        return ExperimentDefinition.newBuilder()
                .setExperimentId("checkout-button")
                .setVersion(3)
                .setArms(List.of("control", "green", "blue"))
                .setControlArm("control")
                .setMetric(MetricSpec.newBuilder().setKind(MetricKind.BERNOULLI).setTrialEvent(EventType.EXPOSURE)
                        .setSuccessEvent(EventType.CLICK).setPrior(new BetaParams(1.0, 9.0)).build())
                .setAllocation(AllocationSpec.newBuilder().setRule(AllocationRule.TOP_TWO_THOMPSON).setBeta(0.5)
                        .setFloor(0.02).setControlShare(0.2).setWarmUpTrials(200).setMaxStep(0.1).build())
                .setStopping(StoppingSpec.newBuilder().setRule(StoppingRule.INDIFFERENCE).setDelta(0.05)
                        .setEpsilon(0.005).setMinTrialsPerArm(1_000).setMinDurationMs(86_400_000L)
                        .setBudgetTrials(300_000L).setDeadline(NOW + 30L * 86_400_000L).build())
                .setAfterStop(AfterStopPolicy.ALL_TO_WINNER)
                .setRecomputePeriodMs(60_000)
                .setHeartbeatMs(300_000)
                .setAttributionWindowMs(86_400_000L)
                .setValidForMs(900_000)
                .build();
    }

    /** A VALUE definition relying on defaults where it can. */
    static ExperimentDefinition valueMetric() {
        return ExperimentDefinition.newBuilder()
                .setExperimentId("offer-wording")
                .setArms(List.of("plain", "urgent"))
                .setMetric(MetricSpec.newBuilder().setKind(MetricKind.VALUE).setValueEvent(EventType.VALUE)
                        .setPrior(new NormalGammaPriorSpec(10.0, 0.01, 1.0, 4.0)).build())
                .setAllocation(AllocationSpec.newBuilder().setRule(AllocationRule.TOP_TWO_EI).build())
                .setStopping(StoppingSpec.newBuilder().build())
                .build();
    }

    /** A VALUE_PER_UNIT definition: revenue per visitor, each visitor's sum capped at 500. */
    static ExperimentDefinition valuePerUnit() {
        return ExperimentDefinition.newBuilder()
                .setExperimentId("cabin-upsell")
                .setArms(List.of("plain", "bundle"))
                .setMetric(MetricSpec.newBuilder().setKind(MetricKind.VALUE_PER_UNIT).setValueEvent(EventType.VALUE)
                        .setValueCap(500.0).build())
                .setAllocation(AllocationSpec.newBuilder().build())
                .setStopping(StoppingSpec.newBuilder().build())
                .build();
    }

    static AllocationUpdate update() {
        return AllocationUpdate.newBuilder()
                .setExperimentId("checkout-button")
                .setDefinitionVersion(3)
                .setSequence(42)
                .setWeights(List.of(new ArmWeight("control", 0.2), new ArmWeight("green", 0.5),
                        new ArmWeight("blue", 0.3)))
                .setComputedAt(NOW)
                .setValidUntil(NOW + 900_000)
                .setStatus(ExperimentStatus.RUNNING)
                .build();
    }

    /** An unsealed decision record for {@link #bernoulli()} (hash empty, previousHash genesis). */
    static DecisionRecord decisionUnsealed() {
        ExperimentDefinition def = bernoulli();
        return DecisionRecord.newBuilder()
                .setExperimentId(def.getExperimentId())
                .setDefinitionVersion(def.getVersion())
                .setSequence(1)
                .setStreamTime(NOW)
                .setStartedAt(NOW - 259_200_000L)
                .setDefinition(def)
                .setArms(List.of(
                        arm("control", 10_000, 1_012, 1_013.0, 8_997.0, 0.031, 0.2, 0.2),
                        arm("green", 12_000, 1_310, 1_311.0, 10_699.0, 0.912, 0.55, 0.5),
                        arm("blue", 9_000, 905, 906.0, 8_104.0, 0.057, 0.25, 0.3)))
                .setAllocationRule(AllocationRule.TOP_TWO_THOMPSON)
                .setAllocationBeta(0.5)
                .setGuards(List.of(Guard.CONTROL_SHARE, Guard.MAX_STEP))
                .setStoppingRule(StoppingRule.INDIFFERENCE)
                .setDelta(0.05)
                .setEpsilon(0.005)
                .setDecision(Decision.CONTINUE)
                .setReason("below-threshold")
                .setStatistic(0.9123)
                .setThreshold(0.95)
                .setSeed(-7_046_029_254_386_353_131L)
                .setDraws(100_000)
                .setMethod(EstimationMethod.MONTE_CARLO)
                .setEngineVersion("0.1.0")
                .setPreviousHash(HashChain.GENESIS)
                .build();
    }

    static DecisionRecord decision() {
        return HashChain.seal(decisionUnsealed(), HashChain.GENESIS);
    }

    /** A sealed decision record for {@link #valueMetric()}, with a STOP. */
    static DecisionRecord valueDecision() {
        ExperimentDefinition def = ExperimentDefinition.newBuilder(valueMetric()).setVersion(1).build();
        DecisionRecord record = DecisionRecord.newBuilder(decisionUnsealed())
                .setExperimentId(def.getExperimentId())
                .setDefinitionVersion(1)
                .setDefinition(def)
                .setArms(List.of(valueArm("plain", 5_000, 10.2, 0.5), valueArm("urgent", 5_100, 11.7, 0.5)))
                .setAllocationRule(AllocationRule.TOP_TWO_EI)
                .setGuards(List.of())
                .setStoppingRule(StoppingRule.GLR)
                .setStartedAt(null)
                .setEpsilon(null)
                .setDecision(Decision.STOP)
                .setWinner("urgent")
                .setReason("threshold-reached")
                .setStatistic(12.7)
                .setThreshold(8.3)
                .setDraws(0)
                .setMethod(EstimationMethod.EXACT)
                .build();
        return HashChain.seal(record, HashChain.GENESIS);
    }

    private static ArmState arm(String name, long trials, long successes, double a, double b, double alpha,
                                double before, double after) {
        return ArmState.newBuilder().setArm(name).setTrials(trials).setSuccesses(successes)
                .setPosterior(new BetaParams(a, b)).setAlpha(alpha).setAlphaStandardError(0.00089)
                .setWeightBeforeGuards(before).setWeight(after).build();
    }

    private static ArmState valueArm(String name, long n, double mean, double weight) {
        return ArmState.newBuilder().setArm(name).setTrials(n).setMean(mean).setM2(n * 31.5)
                .setPosterior(new StudentTParams(mean, 0.079, n + 2.0)).setAlpha(mean > 11 ? 1.0 : 0.0)
                .setAlphaStandardError(0.0).setWeightBeforeGuards(weight).setWeight(weight).build();
    }
}
