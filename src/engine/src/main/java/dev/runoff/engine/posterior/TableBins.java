package dev.runoff.engine.posterior;

/**
 * The body of {@link BetaTableSampler}: equal bins over {@code [lo, hi]}, and per bin the bounds of the
 * density relative to its mode ({@code f = exp(h)}, see {@link RelativeLogDensity}) that the sampler uses.
 *
 * <p>For a bin {@code [e0, e1]} with position {@code t = (x - e0) / (e1 - e0)} and the end values
 * {@code f0 = f(e0)}, {@code f1 = f(e1)}:
 * <ul>
 *   <li>the rectangle bounds {@code low = min(f0, f1)} and {@code high = max(f0, f1)}, or 1 where the bin
 *       holds the mode (a unimodal density is monotone on either side of its mode);</li>
 *   <li>a lower line: {@code h} is concave, so it lies above its chord {@code h0 + t (h1 - h0)}, and
 *       {@code exp} lies above its tangent: {@code f >= sqrt(f0 f1) (1 + (t - 1/2)(h1 - h0))};</li>
 *   <li>two upper lines: a concave {@code h} lies below the extension of its chord over a neighbouring bin
 *       (the chord over {@code [e0 - w, e0]} extended to the right, the one over {@code [e1, e1 + w]} to
 *       the left; {@code w} the bin width), and the exponential of a line is convex, so below its chord
 *       over the bin: {@code f <= f0 (1 + t (f0 / f(e0 - w) - 1))} and
 *       {@code f <= f1 (1 + (1 - t)(f1 / f(e1 + w) - 1))} (the chord bound of concave functions, as in the
 *       tangent and secant envelopes of log-concave densities: Devroye 1986, chapter VII; Gilks and Wild
 *       1992). They need no density value beyond the edges and one more point at each end of the body.</li>
 * </ul>
 * Every upper bound is raised and every lower bound lowered by the relative {@code slack}. A line that
 * cannot be formed (a density of 0, or a neighbouring point outside the support) is left out.
 */
final class TableBins {
    private final double[] edge;
    private final double width;
    private final double[] low;
    private final double[] high;
    /** Per bin the lower line {@code c + d t} and the upper lines {@code p0 + q0 t}, {@code p1 + q1 t}. */
    private final double[] lines;

    private TableBins(double[] edge, double width, double[] low, double[] high, double[] lines) {
        this.edge = edge;
        this.width = width;
        this.low = low;
        this.high = high;
        this.lines = lines;
    }

    static TableBins of(RelativeLogDensity h, double lo, double hi, int bins, double slack) {
        double width = (hi - lo) / bins;
        double[] edge = new double[bins + 1];
        double[] logF = new double[bins + 3];
        double[] f = new double[bins + 3];
        for (int i = -1; i <= bins + 1; i++) {
            double x = i == bins ? hi : lo + i * width;
            if (i >= 0 && i <= bins) {
                edge[i] = x;
            }
            logF[i + 1] = x >= 0 && x <= 1 ? h.at(x) : Double.NEGATIVE_INFINITY;
            f[i + 1] = StrictMath.exp(logF[i + 1]);
        }
        double[] low = new double[bins];
        double[] high = new double[bins];
        double[] lines = new double[6 * bins];
        for (int i = 0; i < bins; i++) {
            double f0 = f[i + 1];
            double f1 = f[i + 2];
            boolean holdsMode = edge[i] < h.mode() && h.mode() < edge[i + 1];
            low[i] = Math.min(f0, f1) * (1 - slack);
            high[i] = (holdsMode ? 1.0 : Math.max(f0, f1)) * (1 + slack);
            lowerLine(lines, 6 * i, f0, f1, logF[i + 2] - logF[i + 1], 1 - slack);
            upperLine(lines, 6 * i + 2, f0, f0 * (f0 / f[i] - 1), 1 + slack);
            double back = f1 * (f1 / f[i + 3]);
            upperLine(lines, 6 * i + 4, back, f1 - back, 1 + slack);
        }
        return new TableBins(edge, width, low, high, lines);
    }

    private static void lowerLine(double[] lines, int at, double f0, double f1, double rise, double shrink) {
        double middle = StrictMath.sqrt(f0 * f1);
        double c = middle * (1 - 0.5 * rise) * shrink;
        double d = middle * rise * shrink;
        boolean usable = middle > 0 && Double.isFinite(c) && Double.isFinite(d);
        lines[at] = usable ? c : Double.NEGATIVE_INFINITY;
        lines[at + 1] = usable ? d : 0;
    }

    private static void upperLine(double[] lines, int at, double p, double q, double grow) {
        boolean usable = Double.isFinite(p) && Double.isFinite(q);
        lines[at] = usable ? p * grow : Double.POSITIVE_INFINITY;
        lines[at + 1] = usable ? q * grow : 0;
    }

    double[] edge() {
        return edge;
    }

    double width() {
        return width;
    }

    /** Envelope areas in alias order: the bins' lower rectangles, their caps, then the two tails. */
    double[] areas(double leftTail, double rightTail) {
        int bins = low.length;
        double[] areas = new double[2 * bins + 2];
        for (int i = 0; i < bins; i++) {
            areas[i] = width * low[i];
            areas[bins + i] = width * (high[i] - low[i]);
        }
        areas[2 * bins] = leftTail;
        areas[2 * bins + 1] = rightTail;
        return areas;
    }

    /** The height in bin {@code i}'s cap at fraction {@code v} of the way from its bottom to its top. */
    double capHeight(int i, double v) {
        return low[i] + (high[i] - low[i]) * v;
    }

    /**
     * Whether the point at position {@code t} and height {@code y} of bin {@code i} is surely under the
     * density (1), surely above it (-1), or neither bound decides (0).
     */
    int squeeze(int i, double t, double y) {
        int at = 6 * i;
        if (y <= lines[at] + lines[at + 1] * t) {
            return 1;
        }
        if (y > lines[at + 2] + lines[at + 3] * t || y > lines[at + 4] + lines[at + 5] * t) {
            return -1;
        }
        return 0;
    }
}
