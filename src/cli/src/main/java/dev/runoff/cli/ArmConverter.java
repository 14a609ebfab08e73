package dev.runoff.cli;

import dev.runoff.engine.core.Arm;
import dev.runoff.engine.stats.ArmStats;
import dev.runoff.engine.stats.BernoulliStats;
import dev.runoff.engine.stats.ValueStats;
import picocli.CommandLine.ITypeConverter;
import picocli.CommandLine.TypeConversionException;

/**
 * Parses {@code --arm NAME=SUCCESSES/TRIALS} (Bernoulli metric) or {@code --arm NAME=COUNT:MEAN:STDDEV}
 * (value metric, sample standard deviation) into a validated {@link Arm}.
 */
final class ArmConverter implements ITypeConverter<Arm> {

    @Override
    public Arm convert(String text) {
        int eq = text.indexOf('=');
        if (eq <= 0) {
            throw bad(text, "expected NAME=SUCCESSES/TRIALS or NAME=COUNT:MEAN:STDDEV");
        }
        String name = text.substring(0, eq).trim();
        String body = text.substring(eq + 1).trim();
        try {
            return new Arm(name, stats(name, body));
        } catch (IllegalArgumentException e) {
            throw bad(text, e.getMessage());
        }
    }

    private static ArmStats stats(String name, String body) {
        String[] counts = body.split("/", -1);
        if (counts.length == 2) {
            long successes = whole(name, "successes", counts[0]);
            return new BernoulliStats(whole(name, "trials", counts[1]), successes);
        }
        String[] summary = body.split(":", -1);
        if (summary.length == 3) {
            long count = whole(name, "count", summary[0]);
            double mean = real(name, "mean", summary[1]);
            double stddev = real(name, "standard deviation", summary[2]);
            if (!(stddev >= 0) || !Double.isFinite(stddev)) {
                throw new IllegalArgumentException("arm '" + name + "': standard deviation must be finite and >= 0, got "
                        + stddev);
            }
            return ValueStats.ofSummary(count, mean, stddev);
        }
        throw new IllegalArgumentException("arm '" + name + "': expected SUCCESSES/TRIALS or COUNT:MEAN:STDDEV, got '"
                + body + "'");
    }

    private static long whole(String arm, String what, String text) {
        try {
            return Long.parseLong(text.trim());
        } catch (NumberFormatException e) {
            throw new IllegalArgumentException("arm '" + arm + "': " + what + " must be a whole number, got '" + text
                    + "'", e);
        }
    }

    private static double real(String arm, String what, String text) {
        try {
            return Double.parseDouble(text.trim());
        } catch (NumberFormatException e) {
            throw new IllegalArgumentException("arm '" + arm + "': " + what + " must be a number, got '" + text + "'", e);
        }
    }

    private static TypeConversionException bad(String text, String why) {
        return new TypeConversionException("'" + text + "': " + why);
    }
}
