package dev.runoff.decision;

import dev.runoff.records.Definitions;
import dev.runoff.records.avro.ArmState;
import dev.runoff.records.avro.DecisionRecord;
import dev.runoff.records.avro.ExperimentDefinition;
import dev.runoff.records.avro.GuardrailSpec;
import dev.runoff.records.avro.GuardrailState;
import java.util.Arrays;
import java.util.List;
import java.util.Map;
import java.util.Objects;

/**
 * Per arm and guardrail: units counted (their conversion window closed), those of them with at least one
 * event of the guardrail's signal, and (value guardrails) the sum of the units' capped values over the cap.
 * Immutable; indexed by the definition's arm order and guardrail order.
 *
 * @param guardrails the guardrail names, in definition order
 * @param counted    {@code counted[arm][guardrail]}
 * @param hits       {@code hits[arm][guardrail]}, each in [0, counted]
 * @param totals     {@code totals[arm][guardrail]}, each in [0, counted]: for a value guardrail the sum over
 *                   the counted units of min(max(sum of the signal's values, 0), valueCap) / valueCap; 0 for a
 *                   rate guardrail
 */
public record GuardrailCounts(List<String> guardrails, long[][] counted, long[][] hits, double[][] totals) {

    /** Copies the arrays and checks their shapes and ranges. */
    public GuardrailCounts {
        guardrails = List.copyOf(guardrails);
        counted = copy(counted, guardrails.size(), "counted");
        hits = copy(hits, guardrails.size(), "hits");
        totals = copy(totals, guardrails.size(), "totals");
        if (counted.length != hits.length || counted.length != totals.length) {
            throw new IllegalArgumentException("counted has " + counted.length + " arms, hits " + hits.length
                    + ", totals " + totals.length);
        }
        for (int a = 0; a < counted.length; a++) {
            for (int g = 0; g < guardrails.size(); g++) {
                if (counted[a][g] < 0 || hits[a][g] < 0 || hits[a][g] > counted[a][g]) {
                    throw new IllegalArgumentException("guardrail '" + guardrails.get(g) + "' of arm " + a
                            + ": hits " + hits[a][g] + " must be in [0, counted=" + counted[a][g] + "]");
                }
                if (!(totals[a][g] >= 0 && totals[a][g] <= counted[a][g])) {
                    throw new IllegalArgumentException("guardrail '" + guardrails.get(g) + "' of arm " + a
                            + ": total " + totals[a][g] + " must be in [0, counted=" + counted[a][g] + "]");
                }
            }
        }
    }

    /** Counts of rate guardrails only (every total 0). */
    public GuardrailCounts(List<String> guardrails, long[][] counted, long[][] hits) {
        this(guardrails, counted, hits, new double[counted.length][guardrails.size()]);
    }

    /** Nothing counted yet for the guardrails of {@code definition}. */
    public static GuardrailCounts empty(ExperimentDefinition definition) {
        int arms = definition.getArms().size();
        List<String> names = names(definition);
        return new GuardrailCounts(names, new long[arms][names.size()], new long[arms][names.size()]);
    }

    /**
     * The counts a decision record holds per arm (its guardrail entries are inputs), or none when it holds
     * none: what an auditor rebuilds.
     */
    public static GuardrailCounts of(DecisionRecord record) {
        List<ArmState> arms = record.getArms();
        if (arms.stream().allMatch(a -> a.getGuardrails() == null)) {
            return null;
        }
        List<String> names = names(record.getDefinition());
        long[][] c = new long[arms.size()][names.size()];
        long[][] h = new long[arms.size()][names.size()];
        double[][] t = new double[arms.size()][names.size()];
        for (int a = 0; a < arms.size(); a++) {
            List<GuardrailState> states = arms.get(a).getGuardrails();
            for (int g = 0; states != null && g < states.size() && g < names.size(); g++) {
                c[a][g] = states.get(g).getCounted();
                h[a][g] = states.get(g).getHits();
                t[a][g] = states.get(g).getTotal() == null ? 0 : states.get(g).getTotal();
            }
        }
        return new GuardrailCounts(names, c, h, t);
    }

    private static List<String> names(ExperimentDefinition definition) {
        return Definitions.guardrails(definition).stream().map(GuardrailSpec::getName).toList();
    }

    private static double[][] copy(double[][] values, int width, String name) {
        double[][] out = new double[values.length][];
        for (int i = 0; i < values.length; i++) {
            checkWidth(name, i, values[i].length, width);
            out[i] = values[i].clone();
        }
        return out;
    }

    private static long[][] copy(long[][] values, int width, String name) {
        long[][] out = new long[values.length][];
        for (int i = 0; i < values.length; i++) {
            checkWidth(name, i, values[i].length, width);
            out[i] = values[i].clone();
        }
        return out;
    }

    /** Checks that row {@code i} has one entry per guardrail. */
    private static void checkWidth(String name, int i, int length, int width) {
        if (length != width) {
            throw new IllegalArgumentException(name + "[" + i + "] has " + length + " entries for " + width
                    + " guardrails");
        }
    }

    /** Units counted for guardrail {@code g} of arm {@code arm}. */
    public long counted(int arm, int g) {
        return counted[arm][g];
    }

    /** Units with the guardrail's signal among them. */
    public long hits(int arm, int g) {
        return hits[arm][g];
    }

    /** Value guardrails: the sum of the units' capped values over the cap; 0 for a rate guardrail. */
    public double total(int arm, int g) {
        return totals[arm][g];
    }

    @Override
    public double[][] totals() {
        return copy(totals, guardrails.size(), "totals");
    }

    @Override
    public long[][] counted() {
        return copy(counted, guardrails.size(), "counted");
    }

    @Override
    public long[][] hits() {
        return copy(hits, guardrails.size(), "hits");
    }

    /**
     * These counts with {@code units} more units of arm {@code arm}, of which {@code signalUnits.get(s)} had
     * signal s and whose capped sums of signal s's values over its cap add up to {@code signalTotals.get(s)}:
     * every guardrail counts the units, as hits those with its signal, and a value guardrail adds the total.
     */
    GuardrailCounts plus(int arm, long units, Map<String, Long> signalUnits, Map<String, Double> signalTotals,
                         ExperimentDefinition definition) {
        List<GuardrailSpec> specs = Definitions.guardrails(definition);
        long[][] c = counted();
        long[][] h = hits();
        double[][] t = totals();
        for (int g = 0; g < specs.size(); g++) {
            c[arm][g] += units;
            h[arm][g] += Math.min(units, signalUnits.getOrDefault(specs.get(g).getSignal(), 0L));
            if (specs.get(g).getValueCap() != null) {
                t[arm][g] = Math.min(c[arm][g], t[arm][g]
                        + Math.min(units, signalTotals.getOrDefault(specs.get(g).getSignal(), 0.0)));
            }
        }
        return new GuardrailCounts(guardrails, c, h, t);
    }

    /**
     * These counts under {@code next}: kept per arm and guardrail name when {@code keep[i]} names the arm's
     * index before (or -1 for a new arm), zero for new arms and new guardrails.
     */
    GuardrailCounts remapped(ExperimentDefinition next, int[] keep) {
        List<String> names = names(next);
        long[][] c = new long[keep.length][names.size()];
        long[][] h = new long[keep.length][names.size()];
        double[][] t = new double[keep.length][names.size()];
        for (int a = 0; a < keep.length; a++) {
            for (int g = 0; g < names.size(); g++) {
                int old = guardrails.indexOf(names.get(g));
                if (keep[a] >= 0 && old >= 0) {
                    c[a][g] = counted[keep[a]][old];
                    h[a][g] = hits[keep[a]][old];
                    t[a][g] = totals[keep[a]][old];
                }
            }
        }
        return new GuardrailCounts(names, c, h, t);
    }

    @Override
    public boolean equals(Object o) {
        return o instanceof GuardrailCounts other && guardrails.equals(other.guardrails)
                && Arrays.deepEquals(counted, other.counted) && Arrays.deepEquals(hits, other.hits)
                && Arrays.deepEquals(totals, other.totals);
    }

    @Override
    public int hashCode() {
        return Objects.hash(guardrails, Arrays.deepHashCode(counted), Arrays.deepHashCode(hits),
                Arrays.deepHashCode(totals));
    }

    @Override
    public String toString() {
        return "GuardrailCounts[" + guardrails + ", counted=" + Arrays.deepToString(counted) + ", hits="
                + Arrays.deepToString(hits) + ", totals=" + Arrays.deepToString(totals) + "]";
    }
}
