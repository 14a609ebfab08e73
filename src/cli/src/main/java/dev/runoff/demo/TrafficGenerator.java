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
    private final Set<String> booked = new HashSet<>();
    private long visitors;
    private long visits;
    private long returningVisits;

    /**
     * @param rates          hidden booking rate of each arm, in [0, 1]
     * @param returningShare probability that a visit (after the first) is by a visitor who came before, in [0, 1)
     * @param meanDelayMs    mean delay from the visit to its booking, > 0
     * @param seed           seed of the generator
     */
    TrafficGenerator(double[] rates, double returningShare, double meanDelayMs, long seed) {
        for (int i = 0; i < rates.length; i++) {
            if (!(rates[i] >= 0 && rates[i] <= 1)) {
                throw new IllegalArgumentException("rates[" + i + "] must be in [0, 1], got " + rates[i]);
            }
        }
        if (!(returningShare >= 0 && returningShare < 1)) {
            throw new IllegalArgumentException("returningShare must be in [0, 1), got " + returningShare);
        }
        if (!(meanDelayMs > 0 && Double.isFinite(meanDelayMs))) {
            throw new IllegalArgumentException("meanDelayMs must be positive and finite, got " + meanDelayMs);
        }
        this.rates = rates.clone();
        this.returningShare = returningShare;
        this.meanDelayMs = meanDelayMs;
        this.rng = RandomSource.XO_RO_SHI_RO_128_PP.create(seed);
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

    private static String unit(long n) {
        return "visitor-" + n;
    }
}
