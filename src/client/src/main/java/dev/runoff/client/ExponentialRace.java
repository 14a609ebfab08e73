package dev.runoff.client;

import java.util.ArrayList;
import java.util.Comparator;
import java.util.List;

/**
 * Sticky weighted choice of one arm for one unit: every arm draws an exponential clock for the unit, scaled by
 * the arm's weight, and the earliest clock wins. Immutable; a pick allocates nothing.
 *
 * <p>Design. For unit hash {@code h} and arm {@code i}, {@code u_i} is a uniform number in (0, 1] that depends
 * only on (experiment, unit, arm name), never on the weights; the arm is {@code argmin_i -ln(u_i) / w_i} over
 * the arms with {@code w_i > 0}. The variables {@code -ln(u_i)} are independent standard exponentials, so arm
 * {@code i} wins with probability {@code w_i / sum(w)} (the exponential race, common practice; it is the
 * P-MinHash sampler of Moulton and Jiang 2018, "Maximally Consistent Sampling and the Jaccard Index of
 * Probability Distributions", ICDMW). Because the clocks do not depend on the weights, a weight change moves a
 * unit only where the order of its scaled clocks changes:
 * <ul>
 *   <li>a unit moves from arm {@code i} to arm {@code j} only if {@code w'_j / w_j > w'_i / w_i} (its new arm
 *       grew relatively more than its old one); units of the arm that grew relatively most never move;</li>
 *   <li>the expected moved share is {@code 1 - J_P(w, w')} with {@code J_P} the paper's collision probability,
 *       which lies between the total variation distance {@code TV} and {@code 2 TV / (1 + TV)}; it equals
 *       {@code TV} when the arms fall into one group that gains and one that loses, each by a common factor
 *       (any change of two arms, one arm switched off, one arm raised).</li>
 * </ul>
 * The choice is a function of the current weights alone, not of their history, so every replica and every
 * restart that holds the same record makes the same choice. Arithmetic is the logarithm of
 * {@link StrictMath#log} (inlined as {@link StrictLog}), products and comparisons, so the result is the same bit
 * for bit on every JVM.
 *
 * <p>Speed: a cheap lower bound of {@code -ln(u)} (three terms of its series) picks the likely winner, whose
 * logarithm is computed; every other arm computes its logarithm only if its lower bound does not already lose.
 * Mathematically the shortcut changes no answer; in floating point the bound is rounded, so it is part of the
 * rule, the same on every JVM.
 */
final class ExponentialRace {

    /** Domain separator of the arm salts; part of the assignment contract (changing it reassigns every unit). */
    static final long ARM_SEED = 0x52554E4F46460002L;

    private static final double UNIT_53 = 0x1.0p-53;

    private final String[] arms;
    private final long[] salts;
    private final double[] inverseWeights;

    private ExponentialRace(String[] arms, long[] salts, double[] inverseWeights) {
        this.arms = arms;
        this.salts = salts;
        this.inverseWeights = inverseWeights;
    }

    /**
     * A race over {@code arms} with {@code weights} (same order, not all zero, none negative); arms of weight
     * 0 never win.
     *
     * @param experimentSeed the experiment's hash seed (arm salts are derived from it and the arm names)
     * @throws IllegalArgumentException when no weight is positive or the lengths differ
     */
    static ExponentialRace of(long experimentSeed, List<String> arms, double[] weights) {
        if (arms.size() != weights.length) {
            throw new IllegalArgumentException("arms and weights differ in length: " + arms.size() + " arms, "
                    + weights.length + " weights");
        }
        List<Integer> order = new ArrayList<>();
        for (int i = 0; i < weights.length; i++) {
            if (weights[i] > 0) {
                order.add(i);
            }
        }
        if (order.isEmpty()) {
            throw new IllegalArgumentException("no positive weight among arms " + arms);
        }
        order.sort(Comparator.comparingDouble((Integer i) -> -weights[i]).thenComparingInt(i -> i));
        long armSeed = UnitHash.mix64(experimentSeed ^ ARM_SEED);
        int n = order.size();
        String[] names = new String[n];
        long[] salts = new long[n];
        double[] inverse = new double[n];
        for (int k = 0; k < n; k++) {
            int i = order.get(k);
            names[k] = arms.get(i);
            salts[k] = UnitHash.hash64(armSeed, arms.get(i));
            inverse[k] = 1.0 / weights[i];
        }
        return new ExponentialRace(names, salts, inverse);
    }

    /**
     * The winning arm for a unit whose hash under the experiment's seed is {@code unitHash}: the smallest
     * clock {@code -ln(u_k) / w_k}, the first in race order on a tie.
     */
    String winner(long unitHash) {
        // pass 1: the arm with the smallest lower bound is the likely winner; only its clock is certainly needed
        int first = 0;
        double firstBound = Double.POSITIVE_INFINITY;
        double secondBound = Double.POSITIVE_INFINITY;
        for (int k = 0; k < arms.length; k++) {
            double bound = lowerBound(uniform(unitHash, k)) * inverseWeights[k];
            if (bound < firstBound) {
                secondBound = firstBound;
                firstBound = bound;
                first = k;
            } else if (bound < secondBound) {
                secondBound = bound;
            }
        }
        double bestClock = clock(uniform(unitHash, first), first);
        return secondBound > bestClock ? arms[first] : contest(unitHash, first, bestClock);
    }

    /** Pass 2: an arm can only beat (or tie earlier than) the best clock if its lower bound does not exceed it. */
    private String contest(long unitHash, int first, double firstClock) {
        int best = first;
        double bestClock = firstClock;
        for (int k = 0; k < arms.length; k++) {
            if (k == first) {
                continue;
            }
            double u = uniform(unitHash, k);
            if (lowerBound(u) * inverseWeights[k] <= bestClock) {
                double clock = clock(u, k);
                if (clock < bestClock || clock == bestClock && k < best) {
                    bestClock = clock;
                    best = k;
                }
            }
        }
        return arms[best];
    }

    private double clock(double u, int k) {
        return -StrictLog.log(u) * inverseWeights[k];
    }

    /**
     * A lower bound of {@code -ln(u)} for u in (0, 1]: the first three terms of its series
     * {@code sum t^n / n}, {@code t = 1 - u}, all of whose terms are positive.
     */
    private static double lowerBound(double u) {
        double t = 1 - u;
        return t * (1 + t * (0.5 + t * (1.0 / 3)));
    }

    /** The unit's uniform number in (0, 1] for the k-th arm of the race. */
    private double uniform(long unitHash, int k) {
        return ((UnitHash.mix64(unitHash ^ salts[k]) >>> 11) + 1) * UNIT_53;
    }
}
