package dev.runoff.decision;

import dev.runoff.engine.best.ProbabilityBest;
import dev.runoff.engine.guardrail.Direction;
import dev.runoff.engine.guardrail.MarginCheck;
import dev.runoff.engine.guardrail.RateSequence;
import dev.runoff.records.Definitions;
import dev.runoff.records.avro.ExperimentDefinition;
import dev.runoff.records.avro.GuardrailDirection;
import dev.runoff.records.avro.GuardrailOutcome;
import dev.runoff.records.avro.GuardrailSpec;
import dev.runoff.records.avro.GuardrailState;
import java.util.ArrayList;
import java.util.List;

/**
 * The guardrail tests of one evaluation ({@link MarginCheck} per arm and guardrail against the reference
 * arm) and what follows from them: which arms are suspended, the weights without them, and whether an arm
 * may be named winner.
 *
 * <p>The reference is the control arm, or, without one, the arm with the largest probability of being best
 * (the first on a tie). The reference is never tested and never suspended. An arm is suspended while one of
 * its guardrails FAILS: {@link Narrowing} leaves it out of the engine's weights and the stopping rule, and
 * {@link #suspend} sets its weight to 0 and scales the others to sum to 1 (all to the reference when the
 * others have none). A suspended arm gets no new units, so its counts, and with them
 * normally its FAIL, stay; a FAIL that a later pass no longer finds lifts the suspension.
 *
 * @param states     per arm, one entry per guardrail (empty lists when the definition has none)
 * @param suspended  per arm, the first guardrail it FAILED, or {@code null}
 * @param reference  index of the reference arm
 */
record GuardrailFindings(List<List<GuardrailState>> states, List<String> suspended, int reference) {

    /** The findings of {@code state} with the engine's probabilities of being best. */
    static GuardrailFindings of(ExperimentState state, ProbabilityBest best) {
        ExperimentDefinition def = state.definition();
        List<GuardrailSpec> specs = Definitions.guardrails(def);
        int arms = def.getArms().size();
        int reference = reference(def, best);
        GuardrailCounts counts = state.guardrails();
        List<List<GuardrailState>> states = new ArrayList<>(arms);
        List<String> suspended = new ArrayList<>(arms);
        for (int a = 0; a < arms; a++) {
            List<GuardrailState> arm = new ArrayList<>(specs.size());
            String failed = null;
            for (int g = 0; g < specs.size(); g++) {
                GuardrailState one = test(specs.get(g), counts, a, reference, g);
                arm.add(one);
                if (failed == null && one.getOutcome() == GuardrailOutcome.FAIL) {
                    failed = one.getGuardrail();
                }
            }
            states.add(arm);
            suspended.add(failed);
        }
        return new GuardrailFindings(states, suspended, reference);
    }

    private static int reference(ExperimentDefinition def, ProbabilityBest best) {
        if (def.getControlArm() != null) {
            return def.getArms().indexOf(def.getControlArm());
        }
        int leader = 0;
        for (int i = 1; i < def.getArms().size(); i++) {
            if (best.alpha(i) > best.alpha(leader)) {
                leader = i;
            }
        }
        return leader;
    }

    /**
     * One arm's test of guardrail {@code g}: a rate guardrail tests the share of units with hits, a value
     * guardrail the mean of the units' capped values over the cap (observations in [0, 1], for which the same
     * confidence sequence holds, see {@link RateSequence#meanBounds}).
     */
    private static GuardrailState test(GuardrailSpec spec, GuardrailCounts counts, int arm, int reference, int g) {
        boolean value = spec.getValueCap() != null;
        MarginCheck.Totals own = observed(counts, arm, g, value);
        GuardrailState.Builder out = GuardrailState.newBuilder().setGuardrail(spec.getName())
                .setCounted(counts.counted(arm, g)).setHits(counts.hits(arm, g))
                .setTotal(value ? own.total() : null);
        if (arm == reference) {
            RateSequence.Bounds b = RateSequence.meanBounds(own.units(), own.total(), spec.getAlpha() / 2);
            return out.setLower(b.lower()).setUpper(b.upper()).setOutcome(GuardrailOutcome.REFERENCE).build();
        }
        MarginCheck.Result r = MarginCheck.check(own, observed(counts, reference, g, value),
                direction(spec.getDirection()), spec.getMargin(), spec.getAlpha());
        return out.setLower(r.arm().lower()).setUpper(r.arm().upper())
                .setOutcome(GuardrailOutcome.valueOf(r.outcome().name())).setStatistic(r.statistic())
                .setThreshold(r.threshold()).build();
    }

    private static MarginCheck.Totals observed(GuardrailCounts counts, int arm, int g, boolean value) {
        return new MarginCheck.Totals(counts.counted(arm, g), value ? counts.total(arm, g) : counts.hits(arm, g));
    }

    private static Direction direction(GuardrailDirection direction) {
        return direction == GuardrailDirection.HIGHER_IS_WORSE ? Direction.HIGHER_IS_WORSE : Direction.LOWER_IS_WORSE;
    }

    /** Whether any arm is suspended. */
    boolean anySuspended() {
        return suspended.stream().anyMatch(java.util.Objects::nonNull);
    }

    /** Whether arm {@code index} passed every guardrail (or is the reference). */
    boolean cleared(int index) {
        return index == reference || states.get(index).stream()
                .allMatch(s -> s.getOutcome() == GuardrailOutcome.PASS);
    }

    /** Whether arm {@code index} is suspended. */
    boolean isSuspended(int index) {
        return suspended.get(index) != null;
    }

    /** {@code weights} with the suspended arms at 0 and the rest scaled to sum to 1. */
    double[] suspend(double[] weights) {
        if (!anySuspended()) {
            return weights;
        }
        double[] out = weights.clone();
        double kept = 0;
        for (int i = 0; i < out.length; i++) {
            if (isSuspended(i)) {
                out[i] = 0;
            } else {
                kept += out[i];
            }
        }
        if (kept <= 0) {
            out[reference] = 1;
            return out;
        }
        for (int i = 0; i < out.length; i++) {
            out[i] /= kept;
        }
        return out;
    }
}
