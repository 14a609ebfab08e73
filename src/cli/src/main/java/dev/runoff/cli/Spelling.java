package dev.runoff.cli;

import dev.runoff.engine.core.Names;

import dev.runoff.engine.EngineConfig;
import dev.runoff.engine.core.Metric;
import dev.runoff.engine.allocation.AllocationMethod;
import dev.runoff.records.Format;
import java.util.ArrayList;
import java.util.Iterator;
import java.util.List;
import picocli.CommandLine.ITypeConverter;
import picocli.CommandLine.TypeConversionException;

/**
 * Command-line spelling of an enum: lower case with hyphens ({@code MONTE_CARLO} is {@code monte-carlo}).
 * Also the list of spellings, for picocli's completion candidates and help.
 *
 * @param <E> the enum
 */
abstract class Spelling<E extends Enum<E>> implements ITypeConverter<E>, Iterable<String> {
    private final Class<E> type;

    Spelling(Class<E> type) {
        this.type = type;
    }

    /** The spelling of {@code value}. */
    static String of(Enum<?> value) {
        return Names.kebab(value);
    }

    @Override
    public E convert(String text) {
        for (E e : type.getEnumConstants()) {
            if (of(e).equals(text)) {
                return e;
            }
        }
        throw new TypeConversionException("'" + text + "' is not one of " + String.join(", ", this));
    }

    @Override
    public Iterator<String> iterator() {
        List<String> names = new ArrayList<>();
        for (E e : type.getEnumConstants()) {
            names.add(of(e));
        }
        return names.iterator();
    }

    /** Spellings of {@link AllocationMethod}. */
    static final class Rules extends Spelling<AllocationMethod> {
        Rules() {
            super(AllocationMethod.class);
        }
    }

    /** Spellings of {@link dev.runoff.engine.guardrail.Direction}. */
    static final class Directions extends Spelling<dev.runoff.engine.guardrail.Direction> {
        Directions() {
            super(dev.runoff.engine.guardrail.Direction.class);
        }
    }

    /** Spellings of {@link EngineConfig.MethodChoice}. */
    static final class Methods extends Spelling<EngineConfig.MethodChoice> {
        Methods() {
            super(EngineConfig.MethodChoice.class);
        }
    }

    /** Spellings of {@link Format}: {@code avro} and {@code json}. */
    static final class Formats extends Spelling<Format> {
        Formats() {
            super(Format.class);
        }
    }

    /** Spellings of {@link Metric}. */
    static final class Metrics extends Spelling<Metric> {
        Metrics() {
            super(Metric.class);
        }
    }
}
