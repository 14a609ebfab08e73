package dev.runoff.cli;

import dev.runoff.engine.core.Metric;
import dev.runoff.engine.stopping.Rule;
import java.util.ArrayList;
import java.util.Iterator;
import java.util.List;
import picocli.CommandLine.ITypeConverter;
import picocli.CommandLine.TypeConversionException;

/**
 * The stopping rules {@code plan} can simulate: one rule, spelled like {@link Rule} in kebab case
 * ({@code glr}, {@code posterior}, {@code indifference}, {@code glr-heuristic}, {@code mixture},
 * {@code sequential-t}), or
 * {@code all} to compare every rule the arms' metric supports.
 */
final class StoppingChoice implements ITypeConverter<StoppingChoice.Selection>, Iterable<String> {
    /** The spelling that selects every rule. */
    static final String ALL = "all";

    @Override
    public Selection convert(String text) {
        if (ALL.equals(text)) {
            return new Selection(null);
        }
        for (Rule r : Rule.values()) {
            if (Spelling.of(r).equals(text)) {
                return new Selection(r);
            }
        }
        throw new TypeConversionException("'" + text + "' is not one of " + String.join(", ", this));
    }

    @Override
    public Iterator<String> iterator() {
        List<String> names = new ArrayList<>();
        for (Rule r : Rule.values()) {
            names.add(Spelling.of(r));
        }
        names.add(ALL);
        return names.iterator();
    }

    /**
     * The chosen rule, or every rule.
     *
     * @param rule the one rule, or null for {@code all}
     */
    record Selection(Rule rule) {

        /** Whether every rule is to be compared. */
        boolean all() {
            return rule == null;
        }

        /**
         * The rules to compare for arms of this metric: every rule the metric supports, in the order of
         * {@link Rule}, without the indifference rule when there is no indifference zone ({@code epsilon} 0).
         */
        List<Rule> rulesFor(Metric metric, double epsilon) {
            List<Rule> rules = new ArrayList<>();
            for (Rule r : Rule.values()) {
                if (r.supports(metric) && (r != Rule.INDIFFERENCE || epsilon > 0)) {
                    rules.add(r);
                }
            }
            return rules;
        }
    }
}
