package dev.runoff.engine.special;

/**
 * {@code log I_x(a, b)} or the log density of Beta(a, b) for one shape pair along increasing points, as engine
 * version 1.6 evaluates them at the nodes of its zero-win integration, in a split form: the log of the value at
 * an anchor point, where it was computed directly ({@link #logAnchor}), and the ratio of the value at the
 * current point to the value there ({@link #ratio}). A caller that needs the sum of several such logs at a
 * point (the log integrand of a probability of being best) multiplies the ratios and takes one logarithm. Not
 * thread-safe (it keeps the last point): one instance per sweep.
 *
 * <p>Design. Between anchors each point is reached by a Taylor step from the previous one, with
 * {@link CachedIncompleteBeta}'s series (its javadoc derives the recurrence of the coefficients {@code c_k} of
 * {@code f(x0 + t) / f(x0) = sum_k c_k t^k} from the density's differential equation; it converges up to the
 * nearer end of the support, and steps are at most {@value #RADIUS_SHARE} of that distance). The same
 * recurrence gives both the step of the density and, integrated term by term, the step of the lower tail:
 * <pre>
 *   D = f(x0 + h) / f(x0) = sum_k c_k h^k,     S = sum_k c_k h^k / (k + 1),
 *   I_{x0 + h} = I_{x0} (1 + rho h S),         rho = f(x0) / I_{x0},     rho' = rho D / (1 + rho h S)
 * </pre>
 * so a step takes no exponential, no logarithm and no density, and its loop no division (the {@code 1 / (k + 1)}
 * are a table): {@link CachedIncompleteBeta} takes an exponential for {@code rho}, a logarithm for
 * {@code log I} and the log density (the kernel and two more logarithms) at every step, and two divisions per
 * term. An anchor (the continued fraction of {@link IncompleteBeta}, or the kernel for the density) is taken at
 * the first point, after {@value #STEPS} steps in a row and wherever a step is not allowed.
 *
 * <p>Which steps are allowed, in standard deviations ({@code z} the start's distance from the mean, {@code h} the
 * step), from the normal approximation {@code D ~ exp(-z h - h^2 / 2)} of the density's ratio: {@code h} at most
 * {@value #STEP_LENGTH}; {@code |z| h} at most {@value #STEP_EXPONENT}, so that the series settles within
 * {@value #MAX_TERMS} terms (one that does not falls back to an anchor); and where the density falls
 * ({@code z > 0}) its alternating terms sum to about {@code e^(z h + h^2 / 2)} against a sum of
 * {@code e^-(z h + h^2 / 2)}, so {@code 2 z h + h^2} is at most {@value #CANCELLATION}: a cancellation of at most
 * {@code e^12.5 ulp}, about {@code 3e-11} relative per step, the same as {@link CachedIncompleteBeta}'s longest
 * step (half a deviation, 12 out). Where the density rises only the {@code -h^2 / 2} part alternates, a
 * cancellation of about {@code e^(h^2)}, at most {@code e^9}. Over a chain of {@value #STEPS} steps that is at
 * most about 1.5e-9 relative, and much less as measured ({@code SweptBetaTest}, against Commons Math), against the
 * 2e-8 engine 1.6's integration is held to.
 */
public final class SweptBeta {
    /** Smallest shapes for which steps are taken (both shapes; as {@link CachedIncompleteBeta}). */
    private static final double STEP_SHAPES = 8;
    /** Longest step, in standard deviations of the distribution. */
    private static final double STEP_LENGTH = 3;
    /** Largest {@code |z| h} (start and step in standard deviations): the series' terms to sum grow with it. */
    private static final double STEP_EXPONENT = 15;
    /** Largest {@code 2 max(z, 0) h + h^2}: the log of the series' cancellation where the density falls. */
    private static final double CANCELLATION = 12.5;
    /** Steps at most from one anchor to the next. */
    private static final int STEPS = 48;
    /** Longest step as a share of the distance to the nearer end of the support (the series' radius). */
    private static final double RADIUS_SHARE = 0.25;
    /** A ratio beyond {@code [1 / RATIO_RANGE, RATIO_RANGE]} is folded into the anchor's log. */
    private static final double RATIO_RANGE = 1e100;
    private static final int MAX_TERMS = 80;
    private static final double TERM_TOLERANCE = 1e-16;
    /** {@code 1 / n} for {@code n} up to {@code MAX_TERMS + 1}: no division in the series' loop. */
    private static final double[] INVERSE = inverses(MAX_TERMS + 2);

    private final IncompleteBeta beta;
    private final boolean lowerTail;
    private final double mean;
    private final double spread;
    private final boolean steps;
    private double lastX = Double.NaN;
    private double logAnchor;
    private double anchorValue;
    private double ratio;
    private double densityOverLower;
    private int chained;

    private SweptBeta(IncompleteBeta beta, boolean lowerTail) {
        this.beta = beta;
        this.lowerTail = lowerTail;
        double a = beta.a();
        double b = beta.b();
        this.mean = a / (a + b);
        this.spread = Math.sqrt(a * b / ((a + b) * (a + b) * (a + b + 1)));
        this.steps = Math.min(a, b) >= STEP_SHAPES;
    }

    /** A sweep of {@code I_x(a, b)}, the distribution function, for the shapes of {@code beta}. */
    public static SweptBeta lowerTail(IncompleteBeta beta) {
        return new SweptBeta(beta, true);
    }

    /** A sweep of the density of Beta(a, b) for the shapes of {@code beta}. */
    public static SweptBeta density(IncompleteBeta beta) {
        return new SweptBeta(beta, false);
    }

    /**
     * Moves to {@code x} with {@code y = 1 - x}, both in {@code (0, 1)}; points visited in increasing order
     * are stepped to, any other point is anchored afresh.
     */
    public void moveTo(double x, double y) {
        if (x == lastX) {
            return;
        }
        double h = x - lastX;
        boolean stepped = steps && h > 0 && chained < STEPS && allowed(h) && step(h);
        if (stepped) {
            chained++;
        } else {
            anchor(x, y);
            chained = 0;
        }
        lastX = x;
    }

    /**
     * Whether a step of {@code h} from the last point is allowed: at most {@value #STEP_LENGTH} standard
     * deviations, within the series' radius, with few enough terms and little enough cancellation.
     */
    private boolean allowed(double h) {
        double z = (lastX - mean) / spread;
        double length = h / spread;
        double falling = Math.max(z, 0);
        return length <= STEP_LENGTH && Math.abs(z) * length <= STEP_EXPONENT
                && 2 * falling * length + length * length <= CANCELLATION
                && h <= RADIUS_SHARE * Math.min(lastX, 1 - lastX);
    }

    /** The log of the value (distribution function or density) at the anchor point. */
    public double logAnchor() {
        return logAnchor;
    }

    /**
     * The value at the current point over the value at the anchor, within {@code [1e-100, 1e100]}: the log of
     * the value at the current point is {@code logAnchor() + log(ratio())}.
     */
    public double ratio() {
        return ratio;
    }

    /** The distribution function at the current point (a sweep of the lower tail only). */
    public double value() {
        return anchorValue * ratio;
    }

    /**
     * One Taylor step of length {@code h} from the last point; false, leaving the state as it was, when the
     * series does not settle within {@value #MAX_TERMS} terms or the density's ratio is not positive.
     */
    private boolean step(double h) {
        double a = beta.a();
        double b = beta.b();
        double x0 = lastX;
        double scale = h / (x0 * (1 - x0));
        double rise = ((a - 1) - (a + b - 2) * x0) * scale;
        double turn = (1 - 2 * x0) * scale;
        double bend = h * scale;
        double shift = -(a + b - 2) - 1;
        double previous = 0;
        double current = 1;
        double density = 1;
        double integral = 1;
        for (int k = 0; k < MAX_TERMS; k++) {
            double next = ((rise - turn * k) * current + (shift + k) * bend * previous) * INVERSE[k + 1];
            double add = next * INVERSE[k + 2];
            density += next;
            integral += add;
            if (Math.abs(next) <= TERM_TOLERANCE * Math.abs(integral) && Math.abs(next) <= Math.abs(current)
                    && Math.abs(next) <= TERM_TOLERANCE * Math.abs(density)) {
                return density > 0 && advance(h, density, integral);
            }
            previous = current;
            current = next;
        }
        return false;
    }

    /** Applies a settled step: the density's ratio {@code density}, the lower tail's series {@code integral}. */
    private boolean advance(double h, double density, double integral) {
        if (lowerTail) {
            double growth = 1 + densityOverLower * h * integral;
            densityOverLower *= density / growth;
            ratio *= growth;
        } else {
            ratio *= density;
        }
        if (ratio > RATIO_RANGE || ratio < 1 / RATIO_RANGE) {
            logAnchor += StrictMath.log(ratio);
            anchorValue *= ratio;
            ratio = 1;
        }
        return true;
    }

    private static double[] inverses(int n) {
        double[] inverse = new double[n];
        for (int k = 1; k < n; k++) {
            inverse[k] = 1.0 / k;
        }
        return inverse;
    }

    /** Takes the value at {@code x} directly: the continued fraction, or the density from the kernel. */
    private void anchor(double x, double y) {
        double kernel = beta.logKernel(x, y);
        if (lowerTail) {
            logAnchor = beta.logLower(x, y, kernel);
            densityOverLower = StrictMath.exp(kernel - logAnchor) / (x * y);
            anchorValue = StrictMath.exp(logAnchor);
        } else {
            logAnchor = kernel - StrictMath.log(x * y);
        }
        ratio = 1;
    }
}
