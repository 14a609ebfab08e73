package dev.runoff.engine.posterior;

/**
 * Walker's alias table (Walker 1977, ACM TOMS 3) built by Vose's procedure (Vose 1991, IEEE Transactions on
 * Software Engineering 17; both from memory), in integer arithmetic: the weights are rounded to integers
 * summing to exactly {@code slots * 2^53}, so every slot ends exactly full and no floating-point
 * remainder has to be patched afterwards.
 */
final class AliasTable {
    /** Capacity of one slot: a slot keeps its own piece when 53 uniform bits fall below its threshold. */
    static final long CAPACITY = 1L << 53;
    /** The alias piece sits above this bit of a slot entry; the threshold, at most 2^53, below it. */
    static final int ALIAS_SHIFT = 54;

    private AliasTable() {
    }

    /**
     * The slot entries for pieces of the given weights: {@code (alias << 54) | threshold}, where a slot
     * {@code j} yields piece {@code j} with probability {@code threshold / 2^53} and its alias otherwise.
     *
     * @param weights non-negative, finite, not all zero, at most {@code slots} of them
     * @param slots   a power of two, at most 512 (so that {@code slots * 2^53 <= 2^62})
     */
    static long[] build(double[] weights, int slots) {
        if (weights.length > slots || slots > 512 || Integer.bitCount(slots) != 1) {
            throw new IllegalArgumentException(weights.length + " weights do not fit an alias table of "
                    + slots + " slots");
        }
        long[] q = integerWeights(weights, slots, total(weights));
        int[] small = new int[slots];
        int[] large = new int[slots];
        int smallCount = 0;
        int largeCount = 0;
        for (int j = 0; j < slots; j++) {
            if (q[j] < CAPACITY) {
                small[smallCount++] = j;
            } else {
                large[largeCount++] = j;
            }
        }
        long[] entry = new long[slots];
        while (smallCount > 0 && largeCount > 0) {
            int s = small[--smallCount];
            int l = large[largeCount - 1];
            entry[s] = ((long) l << ALIAS_SHIFT) | q[s];
            q[l] -= CAPACITY - q[s];
            if (q[l] < CAPACITY) {
                largeCount--;
                small[smallCount++] = l;
            }
        }
        if (smallCount > 0) {
            throw new IllegalStateException("alias table left " + smallCount + " slots unfilled");
        }
        while (largeCount > 0) {
            int l = large[--largeCount];
            entry[l] = ((long) l << ALIAS_SHIFT) | CAPACITY;
        }
        return entry;
    }

    private static double total(double[] weights) {
        double total = 0;
        for (int k = 0; k < weights.length; k++) {
            if (!(weights[k] >= 0 && weights[k] < Double.POSITIVE_INFINITY)) {
                throw new IllegalArgumentException("alias weight " + k + " must be finite and >= 0, got "
                        + weights[k]);
            }
            total += weights[k];
        }
        if (!(total > 0 && total < Double.POSITIVE_INFINITY)) {
            throw new IllegalArgumentException("alias weights must have a finite positive total, got " + total);
        }
        return total;
    }

    /** Weights scaled to integers summing to exactly {@code slots * 2^53}; the rounding goes to the largest. */
    private static long[] integerWeights(double[] weights, int slots, double total) {
        double scale = slots * (double) CAPACITY / total;
        long[] q = new long[slots];
        long assigned = 0;
        int largest = 0;
        for (int k = 0; k < weights.length; k++) {
            q[k] = (long) (weights[k] * scale);
            assigned += q[k];
            if (q[k] > q[largest]) {
                largest = k;
            }
        }
        q[largest] += slots * CAPACITY - assigned;
        return q;
    }
}
