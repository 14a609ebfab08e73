package dev.runoff.testkit;

import dev.runoff.records.avro.AfterStopPolicy;
import dev.runoff.records.avro.AllocationRule;
import dev.runoff.records.avro.AllocationSpec;
import dev.runoff.records.avro.CountingMode;
import dev.runoff.records.avro.EventType;
import dev.runoff.records.avro.ExperimentDefinition;
import dev.runoff.records.avro.MetricKind;
import dev.runoff.records.avro.MetricSpec;
import dev.runoff.records.avro.StoppingRule;
import dev.runoff.records.avro.StoppingSpec;
import java.util.List;

/** Definitions for tests: short periods, so that a test advances the clock by seconds. */
public final class TestDefinitions {

    /** Recompute period of the test definitions. */
    public static final long RECOMPUTE_MS = 1_000;
    /** Heartbeat of the test definitions. */
    public static final long HEARTBEAT_MS = 10_000;
    /** Attribution window of the test definitions. */
    public static final long WINDOW_MS = 60_000;

    private TestDefinitions() {
    }

    /** EXPOSURE trials, CLICK successes, uniform prior, top-two Thompson, GLR with delta 0.05. */
    public static ExperimentDefinition bernoulli(String id, String... arms) {
        return ExperimentDefinition.newBuilder()
                .setExperimentId(id)
                .setArms(List.of(arms))
                .setMetric(MetricSpec.newBuilder().setKind(MetricKind.BERNOULLI).setTrialEvent(EventType.EXPOSURE)
                        .setSuccessEvent(EventType.CLICK).build())
                .setAllocation(AllocationSpec.newBuilder().setRule(AllocationRule.TOP_TWO_THOMPSON).setWarmUpTrials(20)
                        .build())
                .setStopping(StoppingSpec.newBuilder().setRule(StoppingRule.GLR).setDelta(0.05).setMinTrialsPerArm(50)
                        .build())
                .setAfterStop(AfterStopPolicy.ALL_TO_WINNER)
                .setRecomputePeriodMs(RECOMPUTE_MS)
                .setHeartbeatMs(HEARTBEAT_MS)
                .setAttributionWindowMs(WINDOW_MS)
                .setValidForMs(60_000)
                .build();
    }

    /** EXPOSURE trials, VALUE observations, default Normal-Gamma prior, top-two Thompson, GLR. */
    public static ExperimentDefinition value(String id, String... arms) {
        ExperimentDefinition def = bernoulli(id, arms);
        def.setMetric(MetricSpec.newBuilder().setKind(MetricKind.VALUE).setTrialEvent(EventType.EXPOSURE)
                .setValueEvent(EventType.VALUE).build());
        return def;
    }

    /**
     * {@code def} with per-exposure counting (every trial event a trial, every success counted at once): for
     * tests of decision mechanics that feed counts directly and must not wait for conversion windows.
     */
    public static ExperimentDefinition perExposure(ExperimentDefinition def) {
        ExperimentDefinition copy = ExperimentDefinition.newBuilder(def).build();
        copy.setCounting(CountingMode.EXPOSURE);
        return copy;
    }

    /** {@code def} with conversion window {@code windowMs}. */
    public static ExperimentDefinition withWindow(ExperimentDefinition def, long windowMs) {
        ExperimentDefinition copy = ExperimentDefinition.newBuilder(def).build();
        copy.setAttributionWindowMs(windowMs);
        return copy;
    }

    /** {@code def} with a change nobody would make by accident: another beta. */
    public static ExperimentDefinition withBeta(ExperimentDefinition def, double beta) {
        ExperimentDefinition copy = ExperimentDefinition.newBuilder(def).build();
        copy.setAllocation(AllocationSpec.newBuilder(def.getAllocation()).setBeta(beta).build());
        return copy;
    }
}
