package dev.runoff.engine.stats;

/**
 * Count, mean and sum of squared deviations (M2) of a value metric, updated with Welford's algorithm and
 * merged with the parallel formula of Chan, Golub and LeVeque (1979), "Updating formulae and a pairwise
 * algorithm for computing sample variances".
 *
 * @param count number of observed values
 * @param mean  their mean (0 when count is 0)
 * @param m2    sum of squared deviations from the mean (0 when count is 0)
 */
public record ValueStats(long count, double mean, double m2) implements ArmStats {

    /** No observations. */
    public static final ValueStats EMPTY = new ValueStats(0, 0.0, 0.0);

    /** Statistics built from a count, a mean and a sample standard deviation (n - 1 denominator). */
    public static ValueStats ofSummary(long count, double mean, double stddev) {
        double m2 = count > 1 ? stddev * stddev * (count - 1) : 0.0;
        return new ValueStats(count, mean, m2);
    }

    @Override
    public long trials() {
        return count;
    }

    /** These statistics with one more observation (Welford's update). */
    public ValueStats add(double x) {
        long n = count + 1;
        double delta = x - mean;
        double newMean = mean + delta / n;
        return new ValueStats(n, newMean, m2 + delta * (x - newMean));
    }

    /** Pooled statistics of two disjoint samples (Chan et al.); associative up to rounding. */
    public ValueStats merge(ValueStats other) {
        if (other.count == 0) {
            return this;
        }
        if (count == 0) {
            return other;
        }
        long n = Math.addExact(count, other.count);
        double delta = other.mean - mean;
        double newMean = mean + delta * ((double) other.count / n);
        double newM2 = m2 + other.m2 + delta * delta * ((double) count * other.count / n);
        return new ValueStats(n, newMean, newM2);
    }

    /** Sample variance with the n - 1 denominator, or NaN below two observations. */
    public double sampleVariance() {
        return count < 2 ? Double.NaN : m2 / (count - 1);
    }

    @Override
    public void validate(String arm) {
        if (count < 0) {
            throw new IllegalArgumentException("arm '" + arm + "': count must be >= 0, got " + count);
        }
        if (!Double.isFinite(mean)) {
            throw new IllegalArgumentException("arm '" + arm + "': mean must be finite, got " + mean);
        }
        if (!(m2 >= 0) || !Double.isFinite(m2)) {
            throw new IllegalArgumentException("arm '" + arm + "': M2 (sum of squared deviations) must be finite and >= 0, got " + m2);
        }
    }
}
