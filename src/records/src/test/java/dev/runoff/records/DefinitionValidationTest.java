package dev.runoff.records;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertSame;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.runoff.engine.core.Metric;
import dev.runoff.engine.posterior.BetaPrior;
import dev.runoff.engine.posterior.NormalGammaPrior;
import dev.runoff.records.avro.AfterStopPolicy;
import dev.runoff.records.avro.AllocationRule;
import dev.runoff.records.avro.BetaParams;
import dev.runoff.records.avro.CountingMode;
import dev.runoff.records.avro.EventType;
import dev.runoff.records.avro.GuardrailDirection;
import dev.runoff.records.avro.GuardrailSpec;
import dev.runoff.records.avro.ExperimentDefinition;
import dev.runoff.records.avro.MetricKind;
import dev.runoff.records.avro.NormalGammaPriorSpec;
import dev.runoff.records.avro.StoppingRule;
import java.util.List;
import java.util.function.Consumer;
import java.util.stream.Stream;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.Arguments;
import org.junit.jupiter.params.provider.MethodSource;

class DefinitionValidationTest {

    static Stream<Arguments> brokenDefinitions() {
        return Stream.of(
                broken("delta of 0", d -> d.getStopping().setDelta(0.0), "stopping.delta", Reason.OUT_OF_RANGE,
                        "must be in (0.0, 1.0), got 0.0"),
                broken("delta of 1", d -> d.getStopping().setDelta(1.0), "stopping.delta", Reason.OUT_OF_RANGE,
                        "got 1.0"),
                broken("beta above 1", d -> d.getAllocation().setBeta(1.5), "allocation.beta", Reason.OUT_OF_RANGE,
                        "must be in [0.0, 1.0], got 1.5"),
                broken("negative floor", d -> d.getAllocation().setFloor(-0.1), "allocation.floor",
                        Reason.OUT_OF_RANGE, "got -0.1"),
                broken("floor times arms above 1", d -> d.getAllocation().setFloor(0.4), "allocation.floor",
                        Reason.INCONSISTENT, "0.4 * 3 arms exceeds 1"),
                broken("control share plus floors above 1", d -> d.getAllocation().setControlShare(0.97),
                        "allocation.controlShare", Reason.INCONSISTENT,
                        "0.97 plus floor 0.02 for each of the other 2 arms exceeds 1"),
                broken("control share below the floor", d -> d.getAllocation().setControlShare(0.01),
                        "allocation.controlShare", Reason.INCONSISTENT, "0.01 is below the floor 0.02"),
                broken("control share without control arm", d -> d.setControlArm(null), "allocation.controlShare",
                        Reason.INCONSISTENT, "needs a controlArm"),
                broken("control arm not among the arms", d -> d.setControlArm("red"), "controlArm",
                        Reason.INCONSISTENT, "'red' is not one of the arms"),
                broken("success event equal to trial event", d -> d.getMetric().setSuccessEvent(EventType.EXPOSURE),
                        "metric.successEvent", Reason.INCONSISTENT, "must differ from trialEvent (EXPOSURE)"),
                broken("trial event changed to the success event", d -> d.getMetric().setTrialEvent(EventType.CLICK),
                        "metric.successEvent", Reason.INCONSISTENT, "must differ from trialEvent (CLICK)"),
                broken("exposure as success", d -> {
                    d.getMetric().setTrialEvent(EventType.CLICK);
                    d.getMetric().setSuccessEvent(EventType.EXPOSURE);
                }, "metric.successEvent", Reason.INCONSISTENT, "cannot be EXPOSURE"),
                broken("bernoulli metric without success event", d -> d.getMetric().setSuccessEvent(null),
                        "metric.successEvent", Reason.MISSING, "missing"),
                broken("bernoulli metric with a value event", d -> d.getMetric().setValueEvent(EventType.VALUE),
                        "metric.valueEvent", Reason.INCONSISTENT, "must be null for kind BERNOULLI, got VALUE"),
                broken("prior of the wrong kind",
                        d -> d.getMetric().setPrior(new NormalGammaPriorSpec(0.0, 1.0, 1.0, 1.0)), "metric.prior",
                        Reason.INCONSISTENT, "needs kind VALUE"),
                broken("negative prior parameter", d -> d.getMetric().setPrior(new BetaParams(-1.0, 1.0)),
                        "metric.prior.a", Reason.OUT_OF_RANGE, "must be >= 0.03"),
                // the shape floor: exact integration loses mass below 0.03 (measured on main, issue 14)
                broken("prior shape below the integration floor",
                        d -> d.getMetric().setPrior(new BetaParams(1.0, 0.029)), "metric.prior.b",
                        Reason.OUT_OF_RANGE, "must be >= 0.03 (smaller Beta shapes lose probability mass in the "
                                + "exact P(best) integration), got 0.029"),
                broken("expected improvement on a bernoulli metric",
                        d -> d.getAllocation().setRule(AllocationRule.TOP_TWO_EI), "allocation.rule",
                        Reason.INCONSISTENT, "TOP_TWO_EI needs metric.kind VALUE"),
                broken("max step of 0", d -> d.getAllocation().setMaxStep(0.0), "allocation.maxStep",
                        Reason.OUT_OF_RANGE, "must be in (0, 1], got 0.0"),
                broken("six guardrails", d -> d.setGuardrails(List.of(failedPayments(), guard("b", "x"),
                        guard("c", "x"), guard("d", "x"), guard("e", "x"), guard("f", "x"))), "guardrails",
                        Reason.TOO_MANY, "6 items, at most 5"),
                broken("two guardrails of one name", d -> d.setGuardrails(List.of(failedPayments(),
                        guard("failed-payments", "refund"))), "guardrails[1].name", Reason.DUPLICATE,
                        "'failed-payments' appears twice"),
                broken("guardrail signal with capitals", d -> d.setGuardrails(List.of(guard("errors", "Payment"))),
                        "guardrails[0].signal", Reason.INVALID_TEXT, "'Payment' must be 1 to 64 of a-z 0-9 and -"),
                broken("guardrail margin of 1 when lower is worse", d -> d.setGuardrails(List.of(
                        new GuardrailSpec("loads", "page-loaded", GuardrailDirection.LOWER_IS_WORSE, 1.0, 0.05, null))),
                        "guardrails[0].margin", Reason.OUT_OF_RANGE, "must be in [0, 1) when lower is worse"),
                broken("negative guardrail margin", d -> d.setGuardrails(List.of(
                        new GuardrailSpec("errors", "error", GuardrailDirection.HIGHER_IS_WORSE, -0.1, 0.05, null))),
                        "guardrails[0].margin", Reason.OUT_OF_RANGE, "got -0.1"),
                broken("guardrail alpha of 0", d -> d.setGuardrails(List.of(
                        new GuardrailSpec("errors", "error", GuardrailDirection.HIGHER_IS_WORSE, 0.1, 0.0, null))),
                        "guardrails[0].alpha", Reason.OUT_OF_RANGE, "must be in (0.0, 1.0), got 0.0"),
                broken("guardrails with exposure counting", d -> {
                    d.setCounting(CountingMode.EXPOSURE);
                    d.setGuardrails(List.of(failedPayments()));
                }, "guardrails", Reason.INCONSISTENT, "need metric.kind BERNOULLI with counting UNIT"),
                broken("negative warm-up", d -> d.getAllocation().setWarmUpTrials(-1), "allocation.warmUpTrials",
                        Reason.OUT_OF_RANGE, "must be >= 0, got -1"),
                broken("indifference rule without epsilon", d -> d.getStopping().setEpsilon(null),
                        "stopping.epsilon", Reason.MISSING, "missing"),
                broken("epsilon of a whole rate", d -> d.getStopping().setEpsilon(1.0), "stopping.epsilon",
                        Reason.OUT_OF_RANGE, "must be in (0.0, 1.0), got 1.0"),
                broken("epsilon with the GLR rule", d -> d.getStopping().setRule(StoppingRule.GLR),
                        "stopping.epsilon", Reason.INCONSISTENT, "only used by rule INDIFFERENCE, got 0.005"),
                broken("budget below the minimum trials", d -> d.getStopping().setBudgetTrials(2_999L),
                        "stopping.budgetTrials", Reason.INCONSISTENT,
                        "2999 is below max(minTrialsPerArm, allocation.warmUpTrials) * arms = 3000"),
                broken("negative minimum duration", d -> d.getStopping().setMinDurationMs(-1), "stopping.minDurationMs",
                        Reason.OUT_OF_RANGE, "must be >= 0, got -1"),
                broken("deadline in the past", d -> d.getStopping().setDeadline(Samples.NOW - 1), "stopping.deadline",
                        Reason.BAD_TIME, "1699999999999 is not after the current time 1700000000000"),
                broken("after-stop to a missing control", d -> {
                    d.setControlArm(null);
                    d.getAllocation().setControlShare(null);
                    d.setAfterStop(AfterStopPolicy.ALL_TO_CONTROL);
                }, "afterStop", Reason.INCONSISTENT, "ALL_TO_CONTROL needs a controlArm"),
                broken("zero recompute period", d -> d.setRecomputePeriodMs(0), "recomputePeriodMs",
                        Reason.OUT_OF_RANGE, "must be >= 1000, got 0"),
                broken("recompute period below the minimum", d -> d.setRecomputePeriodMs(999), "recomputePeriodMs",
                        Reason.OUT_OF_RANGE, "must be >= 1000, got 999"),
                broken("negative heartbeat", d -> d.setHeartbeatMs(-5), "heartbeatMs", Reason.OUT_OF_RANGE,
                        "must be >= 10000, got -5"),
                broken("heartbeat below the minimum", d -> d.setHeartbeatMs(9_999), "heartbeatMs",
                        Reason.OUT_OF_RANGE, "must be >= 10000, got 9999"),
                broken("zero attribution window", d -> d.setAttributionWindowMs(0), "attributionWindowMs",
                        Reason.OUT_OF_RANGE, "must be >= 1, got 0"),
                broken("weights expiring before the next heartbeat", d -> d.setValidForMs(300_000), "validForMs",
                        Reason.INCONSISTENT, "300000 must exceed both recomputePeriodMs and heartbeatMs (300000)"),
                broken("negative version", d -> d.setVersion(-1), "version", Reason.OUT_OF_RANGE,
                        "must be >= 0, got -1"),
                broken("blank arm name", d -> d.setArms(List.of("control", " ", "blue")), "arms[1]",
                        Reason.INVALID_TEXT, "must not be blank"),
                broken("NaN beta", d -> d.getAllocation().setBeta(Double.NaN), "allocation.beta", Reason.NOT_FINITE,
                        "NaN is not a finite number"));
    }

    @ParameterizedTest(name = "{0}")
    @MethodSource("brokenDefinitions")
    void brokenDefinitionIsRejectedNamingTheField(String name, Consumer<ExperimentDefinition> change,
                                                  String field, Reason reason, String message) {
        assertOnlyProblem(Samples.bernoulli(), change, field, reason, message);
    }

    /** {@code def} changed by {@code change} is rejected with exactly one problem, the one named. */
    private static void assertOnlyProblem(ExperimentDefinition def, Consumer<ExperimentDefinition> change,
                                          String field, Reason reason, String message) {
        change.accept(def);
        Decoded<ExperimentDefinition> decoded = Definitions.validate(def, Samples.NOW);
        Rejections.assertFirstProblem(decoded, field, reason, message);
        assertEquals(1, decoded.problems().size(), decoded.problems().toString());
    }

    @Test
    void validDefinitionsAreReturnedUnchanged() {
        ExperimentDefinition def = Samples.bernoulli();
        assertSame(def, Definitions.validate(def, Samples.NOW).orThrow());
        ExperimentDefinition value = Samples.valueMetric();
        assertSame(value, Definitions.validate(value, Samples.NOW).orThrow());
    }

    @Test
    void aValuePerUnitDefinitionIsValidAndIsAUnitLevelValueMetricForTheEngine() {
        ExperimentDefinition def = Samples.valuePerUnit();
        assertSame(def, Definitions.validate(def, Samples.NOW).orThrow());
        assertEquals(Metric.VALUE, Definitions.metric(def));
        assertTrue(Definitions.unitLevel(def));
        assertEquals(500.0, Definitions.valueCap(def));
        assertEquals(NormalGammaPrior.WEAK, Definitions.prior(def));
        def.getStopping().setRule(StoppingRule.SEQUENTIAL_T);
        def.getAllocation().setRule(AllocationRule.TOP_TWO_EI);
        assertSame(def, Definitions.validate(def, Samples.NOW).orThrow(), "the rules VALUE allows");
        assertTrue(Double.isNaN(Definitions.valueCap(Samples.valueMetric())));
        assertTrue(!Definitions.unitLevel(Samples.valueMetric()));
    }

    static Stream<Arguments> brokenValuePerUnitDefinitions() {
        return Stream.of(
                Arguments.of("no cap", (Consumer<ExperimentDefinition>) d -> d.getMetric().setValueCap(null),
                        "metric.valueCap", Reason.MISSING, ""),
                Arguments.of("zero cap", (Consumer<ExperimentDefinition>) d -> d.getMetric().setValueCap(0.0),
                        "metric.valueCap", Reason.OUT_OF_RANGE, "must be a finite number > 0, got 0.0"),
                Arguments.of("infinite cap", (Consumer<ExperimentDefinition>) d -> d.getMetric()
                        .setValueCap(Double.POSITIVE_INFINITY), "metric.valueCap", Reason.NOT_FINITE, "not a finite number"),
                Arguments.of("NaN cap", (Consumer<ExperimentDefinition>) d -> d.getMetric().setValueCap(Double.NaN),
                        "metric.valueCap", Reason.NOT_FINITE, "not a finite number"),
                Arguments.of("exposure counting", (Consumer<ExperimentDefinition>) d -> d.setCounting(
                        CountingMode.EXPOSURE), "counting", Reason.INCONSISTENT,
                        "metric.kind VALUE_PER_UNIT counts units (UNIT), got EXPOSURE"),
                Arguments.of("no value event", (Consumer<ExperimentDefinition>) d -> d.getMetric().setValueEvent(null),
                        "metric.valueEvent", Reason.MISSING, ""),
                Arguments.of("mixture stopping", (Consumer<ExperimentDefinition>) d -> d.getStopping()
                        .setRule(StoppingRule.MIXTURE), "stopping.rule", Reason.INCONSISTENT,
                        "MIXTURE needs metric.kind BERNOULLI"),
                Arguments.of("beta prior", (Consumer<ExperimentDefinition>) d -> d.getMetric()
                        .setPrior(new BetaParams(1.0, 1.0)), "metric.prior", Reason.INCONSISTENT,
                        "a Beta prior (a, b) needs kind BERNOULLI"));
    }

    @ParameterizedTest(name = "{0}")
    @MethodSource("brokenValuePerUnitDefinitions")
    void brokenValuePerUnitDefinitionIsRejectedNamingTheField(String name, Consumer<ExperimentDefinition> change,
                                                             String field, Reason reason, String message) {
        assertOnlyProblem(Samples.valuePerUnit(), change, field, reason, message);
    }

    @Test
    void aValueCapIsRefusedForEveryOtherKind() {
        for (ExperimentDefinition def : List.of(Samples.bernoulli(), Samples.valueMetric())) {
            assertOnlyProblem(def, d -> d.getMetric().setValueCap(100.0), "metric.valueCap", Reason.INCONSISTENT,
                    "only used by kind VALUE_PER_UNIT, got 100.0");
        }
    }

    @Test
    void aBetaPriorAtTheShapeFloorIsAccepted() {
        ExperimentDefinition def = Samples.bernoulli();
        def.getMetric().setPrior(new BetaParams(Definitions.MIN_BETA_PRIOR_SHAPE, Definitions.MIN_BETA_PRIOR_SHAPE));
        assertSame(def, Definitions.validate(def, Samples.NOW).orThrow());
    }

    @Test
    void theMixtureRuleNeedsABernoulliMetric() {
        assertOnlyProblem(Samples.valueMetric(), d -> d.getStopping().setRule(StoppingRule.MIXTURE), "stopping.rule",
                Reason.INCONSISTENT, "MIXTURE needs metric.kind BERNOULLI");
    }

    @Test
    void theSequentialTRuleNeedsAValueMetricAndIsAcceptedForOne() {
        assertOnlyProblem(Samples.bernoulli(), rates -> {
            rates.getStopping().setRule(StoppingRule.SEQUENTIAL_T);
            rates.getStopping().setEpsilon(null);
        }, "stopping.rule", Reason.INCONSISTENT, "SEQUENTIAL_T needs metric.kind VALUE");
        ExperimentDefinition values = Samples.valueMetric();
        values.getStopping().setRule(StoppingRule.SEQUENTIAL_T);
        assertSame(values, Definitions.validate(values, Samples.NOW).orThrow());
    }

    @Test
    void theNewStoppingRulesAreAcceptedForBernoulliMetrics() {
        for (StoppingRule rule : List.of(StoppingRule.GLR_HEURISTIC, StoppingRule.MIXTURE)) {
            ExperimentDefinition def = Samples.bernoulli();
            def.getStopping().setRule(rule);
            def.getStopping().setEpsilon(null);
            assertSame(def, Definitions.validate(def, Samples.NOW).orThrow(), rule.name());
        }
    }

    @Test
    void everyProblemIsReportedAtOnce() {
        ExperimentDefinition def = Samples.bernoulli();
        def.getStopping().setDelta(2.0);
        def.getAllocation().setBeta(-1.0);
        def.setControlArm("red");
        def.setHeartbeatMs(0);
        def.getStopping().setDeadline(0L);
        List<String> fields = Definitions.validate(def, Samples.NOW).problems().stream().map(Problem::field).toList();
        assertEquals(List.of("controlArm", "allocation.beta", "stopping.delta", "heartbeatMs"), fields);
    }

    @Test
    void timeRulesRunOnlyOnceTheOtherRulesHold() {
        ExperimentDefinition def = Samples.bernoulli();
        def.getStopping().setDeadline(0L);
        assertEquals(List.of("stopping.deadline"),
                Definitions.validate(def, Samples.NOW).problems().stream().map(Problem::field).toList());
        def.setHeartbeatMs(0);
        assertEquals(List.of("heartbeatMs"),
                Definitions.validate(def, Samples.NOW).problems().stream().map(Problem::field).toList());
    }

    @Test
    void valueDefinitionNeedsAValueEventThatIsNotAClick() {
        ExperimentDefinition def = Samples.valueMetric();
        def.getMetric().setValueEvent(EventType.CLICK);
        Problem problem = Definitions.validate(def, Samples.NOW).problems().get(0);
        assertEquals("metric.valueEvent", problem.field());
        assertTrue(problem.message().startsWith("cannot be CLICK"), problem.message());
        def.getMetric().setValueEvent(null);
        assertEquals("metric.valueEvent: missing", Definitions.validate(def, Samples.NOW).problems().get(0).toString());
    }

    @Test
    void negativeTimeIsRefused() {
        assertThrows(IllegalArgumentException.class, () -> Definitions.validate(Samples.bernoulli(), -1));
    }

    @Test
    void newExperimentGetsVersionOneWhateverTheAuthorSent() {
        ExperimentDefinition submitted = Samples.bernoulli();
        submitted.setVersion(77);
        assertEquals(1, Definitions.assignVersion(null, submitted).getVersion());
    }

    @Test
    void resubmittingTheSameContentKeepsTheCurrentVersion() {
        ExperimentDefinition current = Definitions.assignVersion(null, Samples.bernoulli());
        ExperimentDefinition again = Samples.bernoulli();
        again.setVersion(0);
        assertSame(current, Definitions.assignVersion(current, again));
    }

    @Test
    void changedContentGetsTheNextVersion() {
        ExperimentDefinition current = Definitions.assignVersion(null, Samples.bernoulli());
        ExperimentDefinition changed = Samples.bernoulli();
        changed.getStopping().setDelta(0.01);
        ExperimentDefinition next = Definitions.assignVersion(current, changed);
        assertEquals(2, next.getVersion());
        assertEquals(0.01, next.getStopping().getDelta());
        assertEquals(3, Definitions.assignVersion(next, Samples.bernoulli()).getVersion());
    }

    @Test
    void missingPriorMeansTheDocumentedDefault() {
        ExperimentDefinition bernoulli = Samples.bernoulli();
        bernoulli.getMetric().setPrior(null);
        assertEquals(BetaPrior.UNIFORM, Definitions.prior(bernoulli));
        assertEquals(Metric.BERNOULLI, Definitions.metric(bernoulli));
        ExperimentDefinition value = Samples.valueMetric();
        value.getMetric().setPrior(null);
        // The schema's doc for metric.prior promises Normal-Gamma(mu0 0, kappa0 0.001, alpha0 1, beta0 0.001).
        assertEquals(new NormalGammaPrior(0.0, 0.001, 1.0, 0.001), Definitions.prior(value));
        assertEquals(Metric.VALUE, Definitions.metric(value));
    }

    @Test
    void givenPriorBecomesTheEnginePrior() {
        assertEquals(new BetaPrior(1.0, 9.0), Definitions.prior(Samples.bernoulli()));
        assertEquals(new NormalGammaPrior(10.0, 0.01, 1.0, 4.0), Definitions.prior(Samples.valueMetric()));
    }

    @Test
    void priorOfTheWrongKindIsRefusedByTheEngineView() {
        ExperimentDefinition def = Samples.bernoulli();
        def.getMetric().setKind(MetricKind.VALUE);
        assertThrows(IllegalArgumentException.class, () -> Definitions.prior(def));
    }

    @Test
    void aDefinitionWithGuardrailsIsValid() {
        ExperimentDefinition def = Samples.bernoulli();
        def.setGuardrails(List.of(failedPayments(), new GuardrailSpec("loads", "page-loaded",
                GuardrailDirection.LOWER_IS_WORSE, 0.05, 0.01, null)));
        Decoded<ExperimentDefinition> decoded = Definitions.validate(def, Samples.NOW);
        assertTrue(decoded.isValid(), decoded.problems().toString());
    }

    private static GuardrailSpec failedPayments() {
        return guard("failed-payments", "payment-failed");
    }

    private static GuardrailSpec guard(String name, String signal) {
        return new GuardrailSpec(name, signal, GuardrailDirection.HIGHER_IS_WORSE, 0.1, 0.05, null);
    }

    private static Arguments broken(String name, Consumer<ExperimentDefinition> change, String field, Reason reason,
                                    String message) {
        return Arguments.of(name, change, field, reason, message);
    }
}
