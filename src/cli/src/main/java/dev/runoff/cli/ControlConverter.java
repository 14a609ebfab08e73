package dev.runoff.cli;

import dev.runoff.engine.allocation.Guards;
import picocli.CommandLine.ITypeConverter;
import picocli.CommandLine.TypeConversionException;

/** Parses {@code --control NAME=SHARE} into a validated control share. */
final class ControlConverter implements ITypeConverter<Guards.ControlShare> {

    @Override
    public Guards.ControlShare convert(String text) {
        int eq = text.lastIndexOf('=');
        if (eq <= 0) {
            throw new TypeConversionException("'" + text + "': expected NAME=SHARE");
        }
        double share;
        try {
            share = Double.parseDouble(text.substring(eq + 1).trim());
        } catch (NumberFormatException e) {
            throw new TypeConversionException("'" + text + "': SHARE must be a number");
        }
        try {
            return new Guards.ControlShare(text.substring(0, eq).trim(), share);
        } catch (IllegalArgumentException e) {
            throw new TypeConversionException("'" + text + "': " + e.getMessage());
        }
    }
}
