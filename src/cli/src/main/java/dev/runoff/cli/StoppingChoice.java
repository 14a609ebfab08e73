package dev.runoff.cli;

import dev.runoff.engine.stopping.Rule;
import java.util.Iterator;
import java.util.List;
import picocli.CommandLine.ITypeConverter;
import picocli.CommandLine.TypeConversionException;

/**
 * The stopping rules {@code plan} can simulate, spelled {@code glr} and {@code posterior}. The indifference
 * rule needs the probability that the leader is within epsilon of the best, which the simulation does not
 * compute yet.
 */
final class StoppingChoice implements ITypeConverter<Rule>, Iterable<String> {
    private static final List<Rule> SUPPORTED = List.of(Rule.GLR, Rule.POSTERIOR);

    @Override
    public Rule convert(String text) {
        for (Rule r : SUPPORTED) {
            if (Spelling.of(r).equals(text)) {
                return r;
            }
        }
        throw new TypeConversionException("'" + text + "' is not one of " + String.join(", ", this));
    }

    @Override
    public Iterator<String> iterator() {
        return SUPPORTED.stream().map(Spelling::of).iterator();
    }
}
