package dev.runoff.engine.allocation;

/** Small helpers on weight and score vectors. */
final class Weights {
    private Weights() {
    }

    /** {@code k} equal weights. */
    static double[] uniform(int k) {
        double[] w = new double[k];
        java.util.Arrays.fill(w, 1.0 / k);
        return w;
    }

    /** Index of the largest score; ties go to the lowest index. */
    static int argmax(double[] score) {
        return argmaxExcept(score, -1);
    }

    /** Index of the largest score other than {@code excluded}; ties go to the lowest index. */
    static int argmaxExcept(double[] score, int excluded) {
        int best = -1;
        for (int i = 0; i < score.length; i++) {
            if (i != excluded && (best < 0 || score[i] > score[best])) {
                best = i;
            }
        }
        return best;
    }

    /** Sum of all entries. */
    static double sum(double[] w) {
        double s = 0;
        for (double x : w) {
            s += x;
        }
        return s;
    }

    /** A copy of {@code w} divided by its sum. */
    static double[] normalised(double[] w) {
        double s = sum(w);
        double[] out = new double[w.length];
        for (int i = 0; i < w.length; i++) {
            out[i] = w[i] / s;
        }
        return out;
    }

    /**
     * Throws unless {@code values} has at least two entries, all finite and non-negative, with a positive
     * sum; the message names {@code what} and the offending index and value.
     */
    static void checkScores(String what, double[] values) {
        if (values.length < 2) {
            throw new IllegalArgumentException(what + " needs at least two arms, got " + values.length);
        }
        for (int i = 0; i < values.length; i++) {
            if (!(values[i] >= 0) || !Double.isFinite(values[i])) {
                throw new IllegalArgumentException(what + "[" + i + "] must be finite and >= 0, got " + values[i]);
            }
        }
        if (!(sum(values) > 0)) {
            throw new IllegalArgumentException(what + " must not all be 0");
        }
    }
}
