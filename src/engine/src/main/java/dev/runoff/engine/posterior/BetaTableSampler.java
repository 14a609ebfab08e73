package dev.runoff.engine.posterior;

import org.apache.commons.rng.UniformRandomProvider;

/**
 * An exact, table-based rejection sampler of Beta(a, b) for {@code a, b >= 1}, built once per posterior and
 * then cheap per draw: most draws cost two 64-bit random words, one table look-up and one multiply-add.
 *
 * <p>Design. For {@code a, b >= 1} the Beta density is log-concave and unimodal, with mode
 * {@code m = (a - 1) / (a + b - 2)}. The sampler draws uniformly from the region under an envelope made of
 * pieces and keeps the abscissa of a point that falls under the density (the rejection method; Devroye 1986,
 * "Non-Uniform Random Variate Generation", chapter II):
 * <ul>
 *   <li>The body {@code [m - K sd, m + K sd]} clipped to {@code [0, 1]} is cut into {@value #BINS} equal
 *       bins ({@link TableBins}). Each bin gives two pieces: a lower rectangle up to the density's minimum
 *       over the bin, entirely under the density, whose points are accepted at once (the squeeze), and a
 *       cap from that minimum to the maximum. A point of a cap is accepted below a line that bounds the
 *       density from below on the bin, rejected above either of two lines that bound it from above, and
 *       only in the thin band between them compared with the density itself. This is the table method with
 *       a piecewise constant hat and a region of immediate acceptance (Ahrens 1993, 1995; Devroye 1986,
 *       chapter VIII).</li>
 *   <li>Beyond the body, each tail is enveloped by the exponential whose log is the tangent of the log
 *       density at the body's edge ({@link TangentTail}): a tangent of a concave function lies above it
 *       (Devroye 1986, chapter VII, on log-concave densities; Gilks and Wild 1992, "Adaptive rejection
 *       sampling for Gibbs sampling", Applied Statistics 41). The truncated exponential is drawn by
 *       inversion; its point is kept when a uniform lies below the ratio of density to envelope.</li>
 *   <li>The piece is chosen in proportion to its envelope area by an alias table ({@link AliasTable}:
 *       Walker 1977; Vose 1991) of {@code 2^SLOT_BITS} slots, exactly filled by the {@code 2 BINS} bin
 *       pieces and the two tails. A rejected point starts a new draw from the piece choice, as the
 *       rejection method requires (retrying within the same piece would weight pieces by envelope
 *       area).</li>
 * </ul>
 * References from memory; of them only the abstract of Hormann's note on Ahrens' algorithm (WU Vienna,
 * Department of Applied Statistics preprint 39) and the introduction of Devroye's 2006 survey chapter
 * "Non-uniform random variate generation" (Handbooks in Operations Research and Management Science 13),
 * which reviews rejection, table methods and log-concave generators, were read for this class.
 *
 * <p>Numerics. The density is handled relative to its mode ({@link RelativeLogDensity}), so no
 * {@code log B(a, b)} is needed and shapes of {@code 1e7} keep full accuracy near the mode. Every upper
 * bound is raised and every lower bound lowered by a relative {@value #SLACK}, far more than the rounding of
 * the log density even for shapes of {@code 1e9} (an absolute error of about {@code 1e-16 K sqrt(a)}), so
 * that the pieces truly bound the density; the cost is a rejection rate higher by about that fraction. The
 * alias weights are the envelope areas rounded to multiples of {@code 2^-62} of the total, a relative change
 * of a piece's probability far below anything a test can see. Transcendental functions are StrictMath's.
 *
 * <p>Randomness: the first word of a try picks the slot (its top {@code SLOT_BITS} bits) and decides slot or
 * alias (its low 53 bits); the second gives the position within the piece; caps and tails take a third. The
 * draws are a pure function of (a, b) and the generator's state. Instances are not thread-safe and share
 * nothing.
 */
public final class BetaTableSampler implements BlockSampler {
    /** Slots of the alias table: two pieces per bin and the two tails fill it exactly. */
    static final int SLOT_BITS = 8;
    /** Bins of the body. */
    static final int BINS = (1 << SLOT_BITS) / 2 - 1;
    /** Half-width of the body in standard deviations. */
    static final double K = 4.5;
    /** Relative widening of every upper bound of the density and narrowing of every lower bound. */
    static final double SLACK = 1e-9;
    /** The largest {@code a + b} this sampler takes. */
    public static final double MAX_SHAPE_SUM = 1e15;
    private static final int LEFT_TAIL = 2 * BINS;
    private static final long LOW_53 = (1L << 53) - 1;
    private static final long THRESHOLD_MASK = (1L << AliasTable.ALIAS_SHIFT) - 1;
    private static final double UNIT = 0x1.0p-53;

    private final UniformRandomProvider rng;
    private final RelativeLogDensity h;
    /** Per slot: the alias piece above bit 54, the threshold (0 .. 2^53) below. */
    private final long[] slots;
    private final TableBins bins;
    private final double[] edge;
    private final double width;
    private final TangentTail left;
    private final TangentTail right;

    private BetaTableSampler(UniformRandomProvider rng, RelativeLogDensity h, TableBins bins, TangentTail left,
                             TangentTail right) {
        this.rng = rng;
        this.h = h;
        this.bins = bins;
        this.edge = bins.edge();
        this.width = bins.width();
        this.left = left;
        this.right = right;
        this.slots = AliasTable.build(bins.areas(left.area(), right.area()), 1 << SLOT_BITS);
    }

    /**
     * Whether this sampler applies: both shapes at least 1 (where the density is log-concave) and their sum at
     * most {@value #MAX_SHAPE_SUM} (far beyond that the body's bins would shrink towards the spacing of doubles
     * near the mode).
     */
    public static boolean supports(double a, double b) {
        return a >= 1 && b >= 1 && a + b <= MAX_SHAPE_SUM;
    }

    /**
     * A sampler of Beta({@code a}, {@code b}) drawing from {@code rng}; builds its tables (about
     * {@value #BINS} density evaluations).
     *
     * @throws IllegalArgumentException unless {@link #supports}{@code (a, b)}
     */
    public static BetaTableSampler of(UniformRandomProvider rng, double a, double b) {
        if (!supports(a, b)) {
            throw new IllegalArgumentException("table Beta sampler needs shapes >= 1 with a + b <= "
                    + MAX_SHAPE_SUM + ", got a=" + a + ", b=" + b);
        }
        RelativeLogDensity h = new RelativeLogDensity(a, b);
        double s = a + b;
        double sd = StrictMath.sqrt((a / s) * (b / s) / (s + 1));
        double lo = Math.max(0.0, h.mode() - K * sd);
        double hi = Math.min(1.0, h.mode() + K * sd);
        TableBins bins = TableBins.of(h, lo, hi, BINS, SLACK);
        TangentTail left = lo > 0 ? TangentTail.of(h, lo, 0.0, SLACK) : TangentTail.NONE;
        TangentTail right = hi < 1 ? TangentTail.of(h, hi, 1.0, SLACK) : TangentTail.NONE;
        return new BetaTableSampler(rng, h, bins, left, right);
    }

    /**
     * One draw. The slot-or-alias choice is made without a branch ({@code keep} is all ones when the 53 low
     * bits fall below the slot's threshold, else 0): the choice is unpredictable, and the branch form ran
     * about 15% slower in a scratch loop.
     */
    @Override
    public double draw() {
        while (true) {
            long r = rng.nextLong();
            int slot = (int) (r >>> (64 - SLOT_BITS));
            long entry = slots[slot];
            int alias = (int) (entry >>> AliasTable.ALIAS_SHIFT);
            int keep = (int) (((r & LOW_53) - (entry & THRESHOLD_MASK)) >> 63);
            int piece = alias ^ ((alias ^ slot) & keep);
            double u = (rng.nextLong() >>> 11) * UNIT;
            if (piece < BINS) {
                return edge[piece] + width * u;
            }
            double x = piece < LEFT_TAIL ? cap(piece - BINS, u) : tail(piece == LEFT_TAIL ? left : right, u);
            if (x == x) {
                return x;
            }
        }
    }

    @Override
    public void fill(double[] out, int n) {
        for (int j = 0; j < n; j++) {
            out[j] = draw();
        }
    }

    /**
     * A point of bin {@code i}'s cap at abscissa fraction {@code u}, or NaN when it lies above the density:
     * accepted below the bin's lower line, rejected above either upper line, and otherwise compared with
     * the density itself.
     */
    private double cap(int i, double u) {
        double y = bins.capHeight(i, (rng.nextLong() >>> 11) * UNIT);
        double x = edge[i] + width * u;
        int verdict = bins.squeeze(i, u, y);
        if (verdict > 0 || verdict == 0 && y <= StrictMath.exp(h.at(x))) {
            return x;
        }
        return Double.NaN;
    }

    /** A point of a tail envelope at fraction {@code u} of its area, or NaN when rejected. */
    private double tail(TangentTail t, double u) {
        double x = t.point(u);
        if (!(x > 0 && x < 1)) {
            return Double.NaN;
        }
        double v = ((rng.nextLong() >>> 11) + 0.5) * UNIT;
        return StrictMath.log(v) <= h.at(x) - t.logEnvelope(x) ? x : Double.NaN;
    }
}
