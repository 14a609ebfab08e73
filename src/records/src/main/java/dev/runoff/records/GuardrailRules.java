package dev.runoff.records;

import dev.runoff.records.avro.ArmState;
import dev.runoff.records.avro.CountingMode;
import dev.runoff.records.avro.ExperimentDefinition;
import dev.runoff.records.avro.GuardrailDirection;
import dev.runoff.records.avro.GuardrailOutcome;
import dev.runoff.records.avro.GuardrailSpec;
import dev.runoff.records.avro.GuardrailState;
import dev.runoff.records.avro.MetricKind;
import java.util.List;
import java.util.regex.Pattern;

/** Rules of a definition's guardrails, of an event's guardrail signal and of a decision's guardrail entries. */
final class GuardrailRules {

    /** Most guardrails one definition may name. */
    static final int MAX_GUARDRAILS = 5;

    private static final Pattern NAME = Pattern.compile("[a-z][a-z0-9-]{0,63}");

    private GuardrailRules() {
    }

    /** Whether {@code text} is a well-formed guardrail or signal name. */
    static boolean wellFormed(String text) {
        return NAME.matcher(text).matches();
    }

    /** The guardrails of {@code def}: each field, names unique, and the metric and counting they need. */
    static void check(ExperimentDefinition def, Problems problems) {
        List<GuardrailSpec> guardrails = def.getGuardrails();
        if (guardrails == null) {
            return;
        }
        if (guardrails.size() > MAX_GUARDRAILS) {
            problems.add("guardrails", Reason.TOO_MANY, guardrails.size() + " items, at most " + MAX_GUARDRAILS);
        }
        MetricKind kind = def.getMetric().getKind();
        if (kind == MetricKind.VALUE || Definitions.counting(def) != CountingMode.UNIT) {
            problems.add("guardrails", Reason.INCONSISTENT, "need metric.kind BERNOULLI with counting UNIT, or"
                    + " VALUE_PER_UNIT (a guardrail counts units whose conversion window has closed)");
        }
        problems.uniqueNames("guardrails", names(guardrails), ".name");
        for (int i = 0; i < guardrails.size(); i++) {
            checkOne(guardrails.get(i), problems.under("guardrails", i));
        }
        checkSharedCaps(guardrails, problems);
    }

    /** Value guardrails that count one signal cap its per-unit sums alike (a unit keeps one sum per signal). */
    private static void checkSharedCaps(List<GuardrailSpec> guardrails, Problems problems) {
        java.util.Map<String, Double> caps = new java.util.HashMap<>();
        for (int i = 0; i < guardrails.size(); i++) {
            GuardrailSpec g = guardrails.get(i);
            if (g.getValueCap() == null) {
                continue;
            }
            Double first = caps.putIfAbsent(g.getSignal(), g.getValueCap());
            if (first != null && !first.equals(g.getValueCap())) {
                problems.under("guardrails", i).add("valueCap", Reason.INCONSISTENT, "must equal " + first
                        + ", the valueCap of an earlier guardrail counting signal " + Problems.quote(g.getSignal())
                        + ", got " + g.getValueCap());
            }
        }
    }

    private static void checkOne(GuardrailSpec guardrail, Problems problems) {
        spelled("name", guardrail.getName(), problems);
        spelled("signal", guardrail.getSignal(), problems);
        double margin = guardrail.getMargin();
        if (guardrail.getDirection() == GuardrailDirection.LOWER_IS_WORSE) {
            if (!(margin >= 0 && margin < 1)) {
                problems.add("margin", Reason.OUT_OF_RANGE, "must be in [0, 1) when lower is worse, got " + margin);
            }
        } else if (!(margin >= 0) || !Double.isFinite(margin)) {
            problems.add("margin", Reason.OUT_OF_RANGE, "must be a finite number >= 0, got " + margin);
        }
        problems.open("alpha", guardrail.getAlpha(), 0, 1);
        Double cap = guardrail.getValueCap();
        if (cap != null && !(cap > 0 && Double.isFinite(cap))) {
            problems.add("valueCap", Reason.OUT_OF_RANGE, "must be a finite number > 0, got " + cap);
        }
    }

    /** A signal on an outcome event: well formed, and not on an exposure. */
    static void checkSignal(String signal, boolean exposure, Problems problems) {
        if (signal == null) {
            return;
        }
        spelled("signal", signal, problems);
        if (exposure) {
            problems.add("signal", Reason.INCONSISTENT, "must be null for EXPOSURE events (an exposure makes the"
                    + " unit, a signal is an outcome of it), got " + Problems.quote(signal));
        }
    }

    /**
     * The guardrail entries of one arm of a decision record: one per guardrail of the definition, in its
     * order, with hits in [0, counted] and bounds in [0, 1]; a suspension names a guardrail the arm FAILED.
     */
    static void checkStates(ArmState state, ExperimentDefinition def, Problems problems) {
        List<GuardrailSpec> specs = Definitions.guardrails(def);
        List<GuardrailState> states = state.getGuardrails();
        if (states == null) {
            if (!specs.isEmpty() || state.getSuspendedBy() != null) {
                problems.add("guardrails", Reason.INCONSISTENT, "missing although the definition names "
                        + names(specs));
            }
            return;
        }
        if (!Names.of(states, GuardrailState::getGuardrail).equals(names(specs))) {
            problems.add("guardrails", Reason.INCONSISTENT, "must list the definition's guardrails " + names(specs)
                    + " in order");
        }
        for (int i = 0; i < states.size(); i++) {
            GuardrailState g = states.get(i);
            Problems one = problems.under("guardrails", i);
            one.atLeast("counted", g.getCounted(), 0);
            if (g.getHits() < 0 || g.getHits() > g.getCounted()) {
                one.add("hits", Reason.OUT_OF_RANGE, "must be in [0, counted=" + g.getCounted() + "], got "
                        + g.getHits());
            }
            checkTotal(g, i < specs.size() && specs.get(i).getValueCap() != null, one);
            one.closed("lower", g.getLower(), 0, 1);
            one.closed("upper", g.getUpper(), g.getLower(), 1);
        }
        String suspendedBy = state.getSuspendedBy();
        if (suspendedBy != null && states.stream().noneMatch(g -> g.getGuardrail().equals(suspendedBy)
                && g.getOutcome() == GuardrailOutcome.FAIL)) {
            problems.add("suspendedBy", Reason.INCONSISTENT, Problems.quote(suspendedBy)
                    + " is not a guardrail this arm FAILED");
        }
    }

    /** The guardrails' names, in order. */
    private static List<String> names(List<GuardrailSpec> specs) {
        return Names.of(specs, GuardrailSpec::getName);
    }

    /** total: set, in [0, counted], exactly for value guardrails. */
    private static void checkTotal(GuardrailState g, boolean value, Problems problems) {
        Double total = g.getTotal();
        if (!value) {
            if (total != null) {
                problems.add("total", Reason.INCONSISTENT, "only set for a guardrail with a valueCap, got " + total);
            }
            return;
        }
        if (problems.present("total", total) && !(total >= 0 && total <= g.getCounted())) {
            problems.add("total", Reason.OUT_OF_RANGE, "must be in [0, counted=" + g.getCounted() + "], got "
                    + total);
        }
    }

    private static void spelled(String field, String text, Problems problems) {
        if (!wellFormed(text)) {
            problems.add(field, Reason.INVALID_TEXT, Problems.quote(text)
                    + " must be 1 to 64 of a-z 0-9 and -, starting with a letter");
        }
    }
}
