package dev.runoff.engine.core;

/** Argument checks whose messages name the offending parameter and value. */
public final class Checks {
    private Checks() {
    }

    /** Throws unless {@code value} is finite. */
    public static double finite(String name, double value) {
        if (!Double.isFinite(value)) {
            throw new IllegalArgumentException(name + " must be a finite number, got " + value);
        }
        return value;
    }

    /** Throws unless {@code value} is finite and strictly positive. */
    public static double positive(String name, double value) {
        if (!(value > 0) || !Double.isFinite(value)) {
            throw new IllegalArgumentException(name + " must be a finite number > 0, got " + value);
        }
        return value;
    }

    /** Throws unless {@code value} is finite and at least zero. */
    public static double nonNegative(String name, double value) {
        if (!(value >= 0) || !Double.isFinite(value)) {
            throw new IllegalArgumentException(name + " must be a finite number >= 0, got " + value);
        }
        return value;
    }

    /** Throws unless {@code value} is at least zero. */
    public static long nonNegative(String name, long value) {
        if (value < 0) {
            throw new IllegalArgumentException(name + " must be >= 0, got " + value);
        }
        return value;
    }

    /** Throws unless {@code lo <= value <= hi} (NaN fails). */
    public static double inClosedRange(String name, double value, double lo, double hi) {
        if (!(value >= lo && value <= hi)) {
            throw new IllegalArgumentException(name + " must be in [" + lo + ", " + hi + "], got " + value);
        }
        return value;
    }

    /** Throws unless {@code lo < value < hi} (NaN fails). */
    public static double inOpenRange(String name, double value, double lo, double hi) {
        if (!(value > lo && value < hi)) {
            throw new IllegalArgumentException(name + " must be in (" + lo + ", " + hi + "), got " + value);
        }
        return value;
    }
}
