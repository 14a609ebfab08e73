package dev.runoff.records;

import dev.runoff.records.avro.AfterStopPolicy;
import dev.runoff.records.avro.AllocationRule;
import dev.runoff.records.avro.AllocationSpec;
import dev.runoff.records.avro.BetaParams;
import dev.runoff.records.avro.CountingMode;
import dev.runoff.records.avro.EventType;
import dev.runoff.records.avro.ExperimentDefinition;
import dev.runoff.records.avro.MetricKind;
import dev.runoff.records.avro.MetricSpec;
import dev.runoff.records.avro.NormalGammaPriorSpec;
import dev.runoff.records.avro.StoppingRule;
import dev.runoff.records.avro.StoppingSpec;
import java.util.EnumSet;
import java.util.List;
import java.util.Set;

/** Rules of {@link ExperimentDefinition}: every field and every combination the job depends on. */
final class DefinitionRules implements RecordRules<ExperimentDefinition> {

    /** Slack for sums of shares that are exactly 1 on paper (1/3 * 3 and the like). */
    private static final double SHARE_SLACK = 1e-12;
    private static final Set<EventType> SUCCESS_EXCLUDED = EnumSet.of(EventType.EXPOSURE);
    private static final Set<EventType> VALUE_EXCLUDED = EnumSet.of(EventType.EXPOSURE, EventType.CLICK);

    @Override
    public void check(ExperimentDefinition def, Limits limits, Problems problems) {
        problems.notBlank("experimentId", def.getExperimentId());
        problems.atLeast("version", def.getVersion(), 0);
        checkArms(def, limits, problems);
        checkMetric(def.getMetric(), problems.under("metric"));
        if (def.getMetric().getKind() == MetricKind.VALUE_PER_UNIT && Definitions.counting(def) != CountingMode.UNIT) {
            problems.add("counting", Reason.INCONSISTENT, "metric.kind VALUE_PER_UNIT counts units (UNIT), got "
                    + def.getCounting());
        }
        checkAllocation(def, problems.under("allocation"));
        checkStopping(def, problems.under("stopping"));
        if (def.getAfterStop() == AfterStopPolicy.ALL_TO_CONTROL && def.getControlArm() == null) {
            problems.add("afterStop", Reason.INCONSISTENT, "ALL_TO_CONTROL needs a controlArm");
        }
        checkPeriods(def, problems);
        GuardrailRules.check(def, problems);
    }

    @Override
    public void checkAt(ExperimentDefinition def, long nowMillis, Limits limits, Problems problems) {
        Long deadline = def.getStopping().getDeadline();
        if (deadline != null && deadline <= nowMillis) {
            problems.add("stopping.deadline", Reason.BAD_TIME,
                    deadline + " is not after the current time " + nowMillis);
        }
    }

    private static void checkArms(ExperimentDefinition def, Limits limits, Problems problems) {
        List<String> arms = def.getArms();
        problems.atLeastItems("arms", arms.size(), limits.minArms());
        problems.uniqueNames("arms", arms, "");
        String control = def.getControlArm();
        if (control != null && !arms.contains(control)) {
            problems.add("controlArm", Reason.INCONSISTENT, Problems.quote(control) + " is not one of the arms");
        }
    }

    private static void checkMetric(MetricSpec metric, Problems problems) {
        boolean bernoulli = metric.getKind() == MetricKind.BERNOULLI;
        checkEvent("successEvent", metric.getSuccessEvent(), bernoulli, metric, SUCCESS_EXCLUDED, problems);
        checkEvent("valueEvent", metric.getValueEvent(), !bernoulli, metric, VALUE_EXCLUDED, problems);
        Object prior = metric.getPrior();
        checkValueCap(metric, problems);
        if (prior instanceof BetaParams beta) {
            if (!bernoulli) {
                problems.add("prior", Reason.INCONSISTENT, "a Beta prior (a, b) needs kind BERNOULLI");
            }
            atLeastShape("prior.a", beta.getA(), problems);
            atLeastShape("prior.b", beta.getB(), problems);
        } else if (prior instanceof NormalGammaPriorSpec normalGamma) {
            if (bernoulli) {
                problems.add("prior", Reason.INCONSISTENT,
                        "a Normal-Gamma prior (mu0, kappa0, alpha0, beta0) needs kind VALUE or VALUE_PER_UNIT");
            }
            problems.positive("prior.kappa0", normalGamma.getKappa0());
            problems.positive("prior.alpha0", normalGamma.getAlpha0());
            problems.positive("prior.beta0", normalGamma.getBeta0());
        }
    }

    /** valueCap: required, finite and > 0 for VALUE_PER_UNIT; null for every other kind. */
    private static void checkValueCap(MetricSpec metric, Problems problems) {
        Double cap = metric.getValueCap();
        if (metric.getKind() != MetricKind.VALUE_PER_UNIT) {
            if (cap != null) {
                problems.add("valueCap", Reason.INCONSISTENT, "only used by kind VALUE_PER_UNIT, got " + cap);
            }
            return;
        }
        if (problems.present("valueCap", cap) && !(cap > 0 && Double.isFinite(cap))) {
            problems.add("valueCap", Reason.OUT_OF_RANGE, "must be a finite number > 0, got " + cap);
        }
    }

    /** A Beta prior shape of at least {@link Definitions#MIN_BETA_PRIOR_SHAPE} (NaN fails). */
    private static void atLeastShape(String field, double shape, Problems problems) {
        String problem = Definitions.betaPriorShapeProblem(shape);
        if (problem != null) {
            problems.add(field, Reason.OUT_OF_RANGE, problem);
        }
    }

    /**
     * successEvent belongs to BERNOULLI metrics, valueEvent to VALUE and VALUE_PER_UNIT metrics; either must differ from the
     * trial event and not be one of the {@code excluded} types.
     */
    private static void checkEvent(String field, EventType event, boolean used, MetricSpec metric,
                                   Set<EventType> excluded, Problems problems) {
        if (!used) {
            if (event != null) {
                problems.add(field, Reason.INCONSISTENT, "must be null for kind " + metric.getKind() + ", got " + event);
            }
            return;
        }
        if (!problems.present(field, event)) {
            return;
        }
        if (event == metric.getTrialEvent()) {
            problems.add(field, Reason.INCONSISTENT, "must differ from trialEvent (" + event + ")");
        } else if (excluded.contains(event)) {
            problems.add(field, Reason.INCONSISTENT, "cannot be " + event + " (excluded: " + excluded + ")");
        }
    }

    private static void checkAllocation(ExperimentDefinition def, Problems problems) {
        AllocationSpec allocation = def.getAllocation();
        int arms = def.getArms().size();
        problems.closed("beta", allocation.getBeta(), 0, 1);
        double floor = allocation.getFloor();
        problems.closed("floor", floor, 0, 1);
        if (floor * arms > 1 + SHARE_SLACK) {
            problems.add("floor", Reason.INCONSISTENT, floor + " * " + arms + " arms exceeds 1");
        }
        Double controlShare = allocation.getControlShare();
        if (controlShare != null) {
            problems.open("controlShare", controlShare, 0, 1);
            if (def.getControlArm() == null) {
                problems.add("controlShare", Reason.INCONSISTENT, "needs a controlArm");
            }
            if (controlShare < floor && floor * arms <= 1 + SHARE_SLACK) {
                problems.add("controlShare", Reason.INCONSISTENT, controlShare + " is below the floor " + floor
                        + " (the control arm gets exactly its share)");
            }
            if (controlShare + floor * (arms - 1) > 1 + SHARE_SLACK) {
                problems.add("controlShare", Reason.INCONSISTENT, controlShare + " plus floor " + floor
                        + " for each of the other " + (arms - 1) + " arms exceeds 1");
            }
        }
        problems.atLeast("warmUpTrials", allocation.getWarmUpTrials(), 0);
        Double maxStep = allocation.getMaxStep();
        if (maxStep != null && !(maxStep > 0 && maxStep <= 1)) {
            problems.add("maxStep", Reason.OUT_OF_RANGE, "must be in (0, 1], got " + maxStep);
        }
        if (allocation.getRule() == AllocationRule.TOP_TWO_EI && def.getMetric().getKind() == MetricKind.BERNOULLI) {
            problems.add("rule", Reason.INCONSISTENT, "TOP_TWO_EI needs metric.kind VALUE or VALUE_PER_UNIT");
        }
    }

    private static void checkStopping(ExperimentDefinition def, Problems problems) {
        StoppingSpec stopping = def.getStopping();
        problems.open("delta", stopping.getDelta(), 0, 1);
        checkEpsilon(stopping, def.getMetric().getKind(), problems);
        if (stopping.getRule() == StoppingRule.MIXTURE && def.getMetric().getKind() != MetricKind.BERNOULLI) {
            problems.add("rule", Reason.INCONSISTENT, "MIXTURE needs metric.kind BERNOULLI");
        }
        if (stopping.getRule() == StoppingRule.SEQUENTIAL_T && def.getMetric().getKind() == MetricKind.BERNOULLI) {
            problems.add("rule", Reason.INCONSISTENT, "SEQUENTIAL_T needs metric.kind VALUE or VALUE_PER_UNIT");
        }
        problems.atLeast("minTrialsPerArm", stopping.getMinTrialsPerArm(), 0);
        problems.atLeast("minDurationMs", stopping.getMinDurationMs(), 0);
        if (stopping.getDeadline() != null) {
            problems.atLeast("deadline", stopping.getDeadline(), 0);
        }
        Long budget = stopping.getBudgetTrials();
        if (budget != null) {
            problems.atLeast("budgetTrials", budget, 1);
            long perArm = Math.max(0, Math.max(stopping.getMinTrialsPerArm(), def.getAllocation().getWarmUpTrials()));
            long needed = saturatedProduct(perArm, def.getArms().size());
            if (budget < needed) {
                problems.add("budgetTrials", Reason.INCONSISTENT, budget + " is below max(minTrialsPerArm, "
                        + "allocation.warmUpTrials) * arms = " + needed + ", so the budget would end the experiment "
                        + "before any rule could");
            }
        }
    }

    private static void checkEpsilon(StoppingSpec stopping, MetricKind kind, Problems problems) {
        Double epsilon = stopping.getEpsilon();
        if (stopping.getRule() != StoppingRule.INDIFFERENCE) {
            if (epsilon != null) {
                problems.add("epsilon", Reason.INCONSISTENT, "only used by rule INDIFFERENCE, got " + epsilon);
            }
            return;
        }
        if (problems.present("epsilon", epsilon)) {
            if (kind == MetricKind.BERNOULLI) {
                problems.open("epsilon", epsilon, 0, 1);
            } else {
                problems.positive("epsilon", epsilon);
            }
        }
    }

    private static void checkPeriods(ExperimentDefinition def, Problems problems) {
        problems.atLeast("recomputePeriodMs", def.getRecomputePeriodMs(), Definitions.MIN_RECOMPUTE_PERIOD_MS);
        problems.atLeast("heartbeatMs", def.getHeartbeatMs(), Definitions.MIN_HEARTBEAT_MS);
        problems.atLeast("attributionWindowMs", def.getAttributionWindowMs(), 1);
        if (def.getEarlyOutcomeGraceMs() != null) {
            problems.atLeast("earlyOutcomeGraceMs", def.getEarlyOutcomeGraceMs(), 0);
        }
        long longestGap = Math.max(def.getRecomputePeriodMs(), def.getHeartbeatMs());
        if (def.getValidForMs() <= longestGap) {
            problems.add("validForMs", Reason.INCONSISTENT, def.getValidForMs() + " must exceed both "
                    + "recomputePeriodMs and heartbeatMs (" + longestGap + "), or weights would expire between "
                    + "publications");
        }
    }

    /** {@code a * b} for non-negative factors, or Long.MAX_VALUE when the product overflows. */
    private static long saturatedProduct(long a, long b) {
        long high = Math.multiplyHigh(a, b);
        long low = a * b;
        return high == 0 && low >= 0 ? low : Long.MAX_VALUE;
    }
}
