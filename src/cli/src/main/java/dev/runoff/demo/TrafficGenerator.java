package dev.runoff.demo;

import java.util.HashSet;
import java.util.Set;
import org.apache.commons.rng.UniformRandomProvider;
import org.apache.commons.rng.simple.RandomSource;

/**
 * Synthetic visitors for the demo, seeded: who visits (a newcomer, or, with a fixed probability, someone who
 * came before, picked uniformly among them) and whether and when a visitor books on the layout served (the
 * layout's hidden rate, at most one booking per visitor, after an exponentially distributed delay). The
 * layout itself is not drawn here: the serving tier picks it. The same seed and the same layouts served give
 * the same visits, bookings and delays.
 */
final class TrafficGenerator {

    /** One visit: the visitor's unit key and whether the visitor came before. */
    record Visit(String unit, boolean returning) {
    }

    private final double[] rates;
    private final double returningShare;
    private final double meanDelayMs;
    private final UniformRandomProvider rng;
    private final double[] failureRates;
    private final double failureDelayMs;
    private final UniformRandomProvider failures;
    private final Set<String> booked = new HashSet<>();
    private long visitors;
    private long visits;
    private long returningVisits;

    /**
     * Visitors without failed payments.
     *
     * @param rates          hidden booking rate of each arm, in [0, 1]
     * @param returningShare probability that a visit (after the first) is by a visitor who came before, in [0, 1)
     * @param meanDelayMs    mean delay from the visit to its booking, > 0
     * @param seed           seed of the generator
     */
    TrafficGenerator(double[] rates, double returningShare, double meanDelayMs, long seed) {
        this(rates, returningShare, meanDelayMs, new double[rates.length], 1, seed);
    }

    /**
     * Visitors with failed payments: a new visitor's payment fails with {@code failureRates[arm]} of the
     * layout served, after an exponential delay of mean {@code failureDelayMs}, drawn from a generator of its
     * own (seed + 1) so that visits and bookings are those of the seed without failures.
     */
    TrafficGenerator(double[] rates, double returningShare, double meanDelayMs, double[] failureRates,
                     double failureDelayMs, long seed) {
        shares("rates", rates);
        shares("failureRates", failureRates);
        if (failureRates.length != rates.length) {
            throw new IllegalArgumentException("failureRates has " + failureRates.length + " entries for "
                    + rates.length + " arms");
        }
        if (!(returningShare >= 0 && returningShare < 1)) {
            throw new IllegalArgumentException("returningShare must be in [0, 1), got " + returningShare);
        }
        if (!(meanDelayMs > 0 && Double.isFinite(meanDelayMs))) {
            throw new IllegalArgumentException("meanDelayMs must be positive and finite, got " + meanDelayMs);
        }
        if (!(failureDelayMs > 0 && Double.isFinite(failureDelayMs))) {
            throw new IllegalArgumentException("failureDelayMs must be positive and finite, got " + failureDelayMs);
        }
        this.rates = rates.clone();
        this.returningShare = returningShare;
        this.meanDelayMs = meanDelayMs;
        this.rng = RandomSource.XO_RO_SHI_RO_128_PP.create(seed);
        this.failureRates = failureRates.clone();
        this.failureDelayMs = failureDelayMs;
        this.failures = RandomSource.XO_RO_SHI_RO_128_PP.create(seed + 1);
    }

    private static void shares(String name, double[] values) {
        for (int i = 0; i < values.length; i++) {
            if (!(values[i] >= 0 && values[i] <= 1)) {
                throw new IllegalArgumentException(name + "[" + i + "] must be in [0, 1], got " + values[i]);
            }
        }
    }

    /** Distinct visitors so far. */
    long visitors() {
        return visitors;
    }

    /** Visits so far, returning ones included. */
    long visits() {
        return visits;
    }

    /** Visits by visitors who came before. */
    long returningVisits() {
        return returningVisits;
    }

    /** The next visit: a returning visitor with probability {@code returningShare} once anyone came, else a new one. */
    Visit nextVisit() {
        visits++;
        if (visitors > 0 && rng.nextDouble() < returningShare) {
            returningVisits++;
            return new Visit(unit(1 + rng.nextLong(visitors)), true);
        }
        return new Visit(unit(++visitors), false);
    }

    /**
     * Whether {@code visit}'s visitor books on the layout {@code arm} served, and after what delay: the delay in
     * milliseconds (exponential with the configured mean), or -1 for no booking. A visitor books at most once.
     */
    long bookingDelay(Visit visit, int arm) {
        if (booked.contains(visit.unit()) || rng.nextDouble() >= rates[arm]) {
            return -1;
        }
        booked.add(visit.unit());
        // inverse CDF of the exponential distribution; 1 - u is in (0, 1]
        return Math.round(-meanDelayMs * Math.log(1 - rng.nextDouble()));
    }

    /**
     * Whether {@code visit}'s payment fails on the layout {@code arm} served, and after what delay: the delay
     * in milliseconds, or -1 for none. Only a new visitor's first visit can fail.
     */
    long failureDelay(Visit visit, int arm) {
        if (visit.returning() || failures.nextDouble() >= failureRates[arm]) {
            return -1;
        }
        return Math.round(-failureDelayMs * Math.log(1 - failures.nextDouble()));
    }

    private static String unit(long n) {
        return "visitor-" + n;
    }
}
