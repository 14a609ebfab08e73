package dev.runoff.records;

import dev.runoff.records.avro.AllocationUpdate;
import dev.runoff.records.avro.ArmWeight;
import dev.runoff.records.avro.BetaParams;
import dev.runoff.records.avro.Decision;
import dev.runoff.records.avro.DecisionRecord;
import dev.runoff.records.avro.EstimationMethod;
import dev.runoff.records.avro.ExperimentStatus;
import dev.runoff.records.avro.Guard;
import dev.runoff.records.avro.StoppingRule;
import java.util.List;
import java.util.function.Consumer;
import java.util.function.Supplier;
import java.util.stream.Stream;
import org.apache.avro.specific.SpecificRecord;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.Arguments;
import org.junit.jupiter.params.provider.MethodSource;

/** Allocation updates and decision records are checked before they are written, and when they are read. */
class OutputRecordRulesTest {

    private static final RecordCodec<AllocationUpdate> UPDATES = RecordCodec.allocationUpdates();
    private static final RecordCodec<DecisionRecord> DECISIONS = RecordCodec.decisionRecords();

    static Stream<Arguments> brokenRecords() {
        return Stream.of(
                update("weights not summing to 1", u -> u.getWeights().get(0).setWeight(0.1), "weights",
                        Reason.INCONSISTENT, "sum to 0.89999"),
                update("negative weight", u -> u.setWeights(List.of(new ArmWeight("a", -0.5),
                        new ArmWeight("b", 1.5))), "weights[0].weight", Reason.OUT_OF_RANGE, "got -0.5"),
                update("one arm", u -> u.setWeights(List.of(new ArmWeight("a", 1.0))), "weights", Reason.TOO_FEW,
                        "1 items, at least 2 required"),
                update("duplicate arm", u -> u.getWeights().get(2).setArm("green"), "weights[2].arm",
                        Reason.DUPLICATE, "'green' appears twice (also at index 1)"),
                update("stopped without winner", u -> u.setStatus(ExperimentStatus.STOPPED), "winner",
                        Reason.MISSING, "missing"),
                update("winner outside the arms", u -> {
                    u.setStatus(ExperimentStatus.STOPPED);
                    u.setWinner("red");
                }, "winner", Reason.INCONSISTENT, "'red' is not one of the arms"),
                update("winner while running", u -> u.setWinner("green"), "winner", Reason.INCONSISTENT,
                        "must be null until the experiment stops"),
                update("expired before computed", u -> u.setValidUntil(u.getComputedAt() - 1), "validUntil",
                        Reason.INCONSISTENT, "is not after computedAt"),
                update("version 0", u -> u.setDefinitionVersion(0), "definitionVersion", Reason.OUT_OF_RANGE,
                        "must be >= 1, got 0"),
                decision("arms differing from the definition", d -> d.getArms().get(2).setArm("red"), "arms",
                        Reason.INCONSISTENT, "differ from the definition's"),
                decision("successes above trials", d -> d.getArms().get(0).setSuccesses(10_001L), "arms[0].successes",
                        Reason.OUT_OF_RANGE, "must be in [0, trials = 10000], got 10001"),
                decision("value statistics on a bernoulli metric", d -> d.getArms().get(1).setMean(0.1),
                        "arms[1].mean", Reason.INCONSISTENT, "must be null for this metric kind"),
                decision("infinite weight in a nested list",
                        d -> d.getArms().get(2).setWeight(Double.NEGATIVE_INFINITY), "arms[2].weight",
                        Reason.NOT_FINITE, "-Infinity is not a finite number"),
                decision("arm without a name", d -> d.getArms().get(1).setArm(null), "arms[1].arm", Reason.MISSING,
                        "missing"),
                decision("control character in the embedded definition",
                        d -> d.getDefinition().getArms().set(0, "a\u0007"), "definition.arms[0]",
                        Reason.INVALID_TEXT, "control character U+0007 at index 1"),
                decision("alpha above 1", d -> d.getArms().get(1).setAlpha(1.2), "arms[1].alpha", Reason.OUT_OF_RANGE,
                        "must be in [0.0, 1.0], got 1.2"),
                decision("guarded weights not summing to 1", d -> d.getArms().get(1).setWeight(0.45), "arms.weight",
                        Reason.INCONSISTENT, "not 1"),
                decision("rule differing from the definition", d -> d.setStoppingRule(StoppingRule.GLR),
                        "stoppingRule", Reason.INCONSISTENT, "GLR differs from definition.stopping.rule (INDIFFERENCE)"),
                decision("definition version differing", d -> d.setDefinitionVersion(4), "definitionVersion",
                        Reason.INCONSISTENT, "4 differs from definition.version (3)"),
                decision("invalid embedded definition", d -> d.getDefinition().getStopping().setDelta(3.0),
                        "definition.stopping.delta", Reason.OUT_OF_RANGE, "got 3.0"),
                decision("stop without winner", d -> d.setDecision(Decision.STOP), "winner", Reason.MISSING,
                        "missing"),
                decision("statistic without threshold", d -> d.setThreshold(null), "threshold", Reason.INCONSISTENT,
                        "both be set or both null"),
                decision("exact method with draws", d -> d.setMethod(EstimationMethod.EXACT), "draws",
                        Reason.INCONSISTENT, "must be 0 for method EXACT, got 100000"),
                decision("start after the decision", d -> d.setStartedAt(d.getStreamTime() + 1), "startedAt",
                        Reason.OUT_OF_RANGE, "must be in [0, streamTime = 1700000000000], got 1700000000001"),
                decision("negative start", d -> d.setStartedAt(-1L), "startedAt", Reason.OUT_OF_RANGE, "got -1"),
                decision("repeated guard", d -> d.setGuards(List.of(Guard.FLOOR, Guard.FLOOR)), "guards",
                        Reason.DUPLICATE, "each guard may appear once"),
                decision("first record not linked to genesis", d -> d.setPreviousHash("ab".repeat(32)),
                        "previousHash", Reason.INCONSISTENT, "must be 64 zeros for sequence 1"),
                decision("upper-case hash", d -> d.setHash(d.getHash().toUpperCase()), "hash", Reason.INVALID_TEXT,
                        "must be 64 lowercase hex digits"),
                decision("content changed after sealing", d -> d.getArms().get(0).setPosterior(new BetaParams(2.0, 3.0)),
                        "hash", Reason.INCONSISTENT, "does not match the record's content"),
                decision("overlong reason", d -> d.setReason("x".repeat(300)), "reason", Reason.TOO_LONG,
                        "300 characters, at most 256 allowed"));
    }

    @ParameterizedTest(name = "{0}")
    @MethodSource("brokenRecords")
    <T extends SpecificRecord> void brokenRecordIsRejectedNamingTheField(String name, RecordCodec<T> codec,
                                                                         Supplier<T> sample, Consumer<T> change,
                                                                         String field, Reason reason, String message) {
        T record = sample.get();
        change.accept(record);
        Rejections.assertFirstProblem(codec.validate(record, Samples.NOW), field, reason, message);
    }

    private static Arguments update(String name, Consumer<AllocationUpdate> change, String field, Reason reason,
                                    String message) {
        return Arguments.of(name, UPDATES, (Supplier<AllocationUpdate>) Samples::update, change, field, reason,
                message);
    }

    private static Arguments decision(String name, Consumer<DecisionRecord> change, String field, Reason reason,
                                      String message) {
        return Arguments.of(name, DECISIONS, (Supplier<DecisionRecord>) Samples::decision, change, field, reason,
                message);
    }
}
