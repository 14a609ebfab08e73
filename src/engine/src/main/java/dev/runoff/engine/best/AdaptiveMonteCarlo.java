package dev.runoff.engine.best;

import dev.runoff.engine.posterior.Posterior;
import java.util.Arrays;
import java.util.List;
import java.util.Objects;
import org.apache.commons.rng.UniformRandomProvider;
import org.apache.commons.rng.simple.RandomSource;

/**
 * The job's default estimator of the probability that each arm is best: seeded joint posterior draws whose
 * number adapts to the question the weights ask (which arm leads, which challenges), with conditional Monte
 * Carlo for the arms that win no draw.
 *
 * <p><b>Draw count.</b> A {@link DrawPolicy} sets it. Stage 0 makes {@code min(policy.firstStage(), maxDraws)}
 * joint draws; each further stage doubles the total, capped at {@code maxDraws}; drawing stops after the
 * first stage the policy finds {@link DrawPolicy#settled settled}, or at the cap. Engine 1.2's policy,
 * {@link LeaderOrder}, starts with {@value #FIRST_STAGE} draws and stops once the leader and the runner-up are
 * ordered or too close for their order to matter; engine 1.3's, {@link DecisionPrecision}, draws until what
 * the evaluation reads from the alphas is precise enough. Every stage continues the same random stream and
 * starts a new block layout, so
 * the result after a stage does not depend on the cap: re-running with the recorded draws as the cap
 * reproduces a decision bit for bit, and a larger recorded count than the rule asks for shows up as a
 * difference.
 *
 * <p><b>Arms that win no draw.</b> Their count says only that alpha is probably below about {@code 3 / M}
 * (the one-sided 95% Clopper-Pearson bound at zero successes, {@link #zeroWinUpperBound}); an alpha of 0
 * would send top-two Thompson sampling into its degenerate split when the leader wins every draw, and would
 * starve an arm whose alpha is merely small. For such an arm i the estimator conditions on theta_i
 * (conditional Monte Carlo, Rao-Blackwellisation: Robert and Roberts 2021, "Rao-Blackwellisation in the
 * Markov chain Monte Carlo era", International Statistical Review, hal-03912172): given theta_i the
 * indicator "arm i is best" has the closed-form expectation {@code prod_{j != i} F_j(theta_i)}, which by the
 * law of total variance is never noisier than the indicator. The remaining one-dimensional expectation over
 * theta_i is integrated with the quadrature of {@link ExactProbabilityBest} rather than by draws of
 * theta_i: those draws almost never reach the upper tail of theta_i where the product is largest, so the
 * draw average is unbiased but almost always far too small. Measured on five Beta arms (40, 90, 120, 180
 * and 230 successes in about 400 trials each): the exact alpha of the first arm is 1.5e-44, the average over
 * 1,024 draws of theta_1 gave 8e-129 to 5e-107 on five seeds; a top-two Thompson simulation fed with such
 * values needed 0.87 of uniform allocation's trials instead of 0.42 (the setting of TopTwoSimulationTest).
 * The quadrature is deterministic, so the standard error recorded for these arms is 0. The leader's alpha is one minus the other arms' alphas, so the alphas
 * sum to 1; its standard error stays the binomial one of its count.
 *
 * <p>Engine 1.5 ({@link DrawnArms#LEAVE_OUT_CERTAIN_LOSERS}) draws each arm from its own stream, seeded from
 * the seed's stream in arm order, and draws no arm that {@link CertainLosers} finds unable to win a draw: such an
 * arm wins nothing and is integrated like any arm that wins no draw.
 *
 * <p>Reproducibility: one {@code RandomSource.XO_SHI_RO_256_PP} stream seeded with {@code seed} feeds the
 * joint draws, in the layout of {@link MonteCarloProbabilityBest} within each stage; the quadrature uses
 * {@code StrictMath}.
 */
public final class AdaptiveMonteCarlo implements ProbabilityBestEstimator {

    /** Joint draws of the first stage of engine 1.2's policy (when the cap allows). */
    public static final int FIRST_STAGE = 10_000;
    /** One-sided confidence level of {@link #zeroWinUpperBound}. */
    public static final double UPPER_BOUND_LEVEL = 0.95;

    private final int maxDraws;
    private final DrawPolicy policy;
    private final DrawSource source;
    private final ExactAlphas exact;
    private final DrawnArms arms;

    /**
     * Engine 1.2's estimator: at most {@code maxDraws} joint draws, the policy {@link LeaderOrder} with a first
     * stage of {@value #FIRST_STAGE}, each posterior's own sampler and the quadrature of
     * {@link ExactProbabilityBest}.
     *
     * @throws IllegalArgumentException if {@code maxDraws < 1}
     */
    public AdaptiveMonteCarlo(int maxDraws) {
        this(maxDraws, FIRST_STAGE, DrawSource.POSTERIOR, ExactAlphas.QUADRATURE);
    }

    /**
     * An estimator drawing at most {@code maxDraws} joint draws, {@code min(firstStage, maxDraws)} in its first
     * stage, from {@code source}, and integrating the arms that win no draw with {@code exact}.
     *
     * @throws IllegalArgumentException if {@code maxDraws < 1} or {@code firstStage < 1}
     */
    public AdaptiveMonteCarlo(int maxDraws, int firstStage, DrawSource source, ExactAlphas exact) {
        this(maxDraws, new LeaderOrder(firstStage), source, exact);
    }

    /**
     * An estimator drawing at most {@code maxDraws} joint draws as {@code policy} decides, from {@code source},
     * and integrating the arms that win no draw with {@code exact}.
     *
     * @throws IllegalArgumentException if {@code maxDraws < 1} or the policy's first stage is below 1
     */
    public AdaptiveMonteCarlo(int maxDraws, DrawPolicy policy, DrawSource source, ExactAlphas exact) {
        this(maxDraws, policy, source, exact, DrawnArms.ALL_ONE_STREAM);
    }

    /**
     * As {@link #AdaptiveMonteCarlo(int, DrawPolicy, DrawSource, ExactAlphas)}, drawing the arms and from the
     * streams {@code arms} says ({@link DrawnArms#LEAVE_OUT_CERTAIN_LOSERS}: engine version 1.5).
     *
     * @throws IllegalArgumentException if {@code maxDraws < 1} or the policy's first stage is below 1
     */
    public AdaptiveMonteCarlo(int maxDraws, DrawPolicy policy, DrawSource source, ExactAlphas exact,
                              DrawnArms arms) {
        if (maxDraws < 1) {
            throw new IllegalArgumentException("maxDraws must be >= 1, got " + maxDraws);
        }
        this.policy = Objects.requireNonNull(policy, "policy");
        if (policy.firstStage() < 1) {
            throw new IllegalArgumentException("firstStage must be >= 1, got " + policy.firstStage());
        }
        this.maxDraws = maxDraws;
        this.source = Objects.requireNonNull(source, "source");
        this.exact = Objects.requireNonNull(exact, "exact");
        this.arms = Objects.requireNonNull(arms, "arms");
    }

    /** The cap on joint draws. */
    public int maxDraws() {
        return maxDraws;
    }

    /**
     * The one-sided Clopper-Pearson upper bound at level {@value #UPPER_BOUND_LEVEL} for a proportion with
     * zero successes in {@code draws} trials: {@code 1 - 0.05^(1/draws)} (Clopper and Pearson 1934,
     * Biometrika 26:404-413; about {@code 3 / draws}, the "rule of three").
     */
    public static double zeroWinUpperBound(int draws) {
        if (draws < 1) {
            throw new IllegalArgumentException("draws must be >= 1, got " + draws);
        }
        return -StrictMath.expm1(StrictMath.log(1 - UPPER_BOUND_LEVEL) / draws);
    }

    /**
     * Alpha for each posterior; see the class comment for the draw count and the zero-win arms.
     *
     * @throws IllegalArgumentException if fewer than two posteriors are given or one is null
     */
    @Override
    public ProbabilityBest estimate(List<? extends Posterior> posteriors, long seed) {
        UniformRandomProvider rng = RandomSource.XO_SHI_RO_256_PP.create(seed);
        Integrated integrated = new Integrated(posteriors);
        int[] drawn = drawnArms(posteriors);
        Posterior.Sampler[] samplers = drawn == null ? MonteCarloProbabilityBest.samplers(posteriors, rng, source)
                : ownStreams(posteriors, drawn, rng);
        long[] drawnWins = new long[samplers.length];
        long[] wins = drawn == null ? drawnWins : new long[posteriors.size()];
        int done = 0;
        int target = Math.min(policy.firstStage(), maxDraws);
        while (true) {
            MonteCarloProbabilityBest.addWins(samplers, target - done, drawnWins);
            spread(drawnWins, drawn, wins);
            done = target;
            if (done == maxDraws || policy.settled(wins, done, () -> integrated.of(conditional(wins)))) {
                break;
            }
            target = (int) Math.min(2L * done, maxDraws);
        }
        return estimates(wins, done, integrated);
    }

    /** The indices of the arms to draw, each from its own stream, or null to draw every arm from one stream. */
    private int[] drawnArms(List<? extends Posterior> posteriors) {
        if (arms == DrawnArms.ALL_ONE_STREAM) {
            return null;
        }
        MonteCarloProbabilityBest.check(posteriors);
        boolean[] which = arms == DrawnArms.LEAVE_OUT_CERTAIN_LOSERS ? CertainLosers.drawn(posteriors, maxDraws)
                : null;
        int[] drawn = new int[posteriors.size()];
        int n = 0;
        for (int i = 0; i < drawn.length; i++) {
            if (which == null || which[i]) {
                drawn[n++] = i;
            }
        }
        return Arrays.copyOf(drawn, n);
    }

    /**
     * Samplers of the drawn arms, each on its own stream: {@code seeds} gives one seed per arm, every arm in
     * order, so an arm's stream does not depend on which arms are drawn.
     */
    private Posterior.Sampler[] ownStreams(List<? extends Posterior> posteriors, int[] drawn,
                                           UniformRandomProvider seeds) {
        long[] armSeeds = new long[posteriors.size()];
        for (int i = 0; i < armSeeds.length; i++) {
            armSeeds[i] = seeds.nextLong();
        }
        Posterior.Sampler[] samplers = new Posterior.Sampler[drawn.length];
        for (int k = 0; k < drawn.length; k++) {
            samplers[k] = source.sampler(posteriors.get(drawn[k]),
                    RandomSource.XO_SHI_RO_256_PP.create(armSeeds[drawn[k]]));
        }
        return samplers;
    }

    /** Copies the drawn arms' wins to their places among all arms (nothing to do when every arm is drawn). */
    private static void spread(long[] drawnWins, int[] drawn, long[] wins) {
        if (drawn != null) {
            for (int k = 0; k < drawn.length; k++) {
                wins[drawn[k]] = drawnWins[k];
            }
        }
    }

    /** The arms that won no draw, the leader aside: their alphas are integrated. */
    private static boolean[] conditional(long[] wins) {
        int leader = Ranking.leader(wins);
        boolean[] conditional = new boolean[wins.length];
        for (int i = 0; i < wins.length; i++) {
            conditional[i] = wins[i] == 0 && i != leader;
        }
        return conditional;
    }

    private ProbabilityBest estimates(long[] wins, int draws, Integrated integratedAlphas) {
        int k = wins.length;
        int leader = Ranking.leader(wins);
        boolean[] conditional = conditional(wins);
        double[] integrated = integratedAlphas.of(conditional);
        double[] alpha = new double[k];
        double[] se = new double[k];
        double others = 0;
        for (int i = 0; i < k; i++) {
            if (i != leader) {
                alpha[i] = conditional[i] ? integrated[i] : (double) wins[i] / draws;
                se[i] = conditional[i] ? 0 : StrictMath.sqrt(alpha[i] * (1 - alpha[i]) / draws);
                others += alpha[i];
            }
        }
        double countShare = (double) wins[leader] / draws;
        alpha[leader] = Math.max(0, 1 - others);
        se[leader] = StrictMath.sqrt(countShare * (1 - countShare) / draws);
        return new ProbabilityBest(alpha, se, ProbabilityBest.Method.MONTE_CARLO, draws, conditional);
    }

    /**
     * The integrated alphas of the arms a mask selects, 0 for the others (all 0 when it selects none),
     * computed once per mask: a policy that asks for them after the last stage leaves the final estimate
     * nothing to integrate again.
     */
    private final class Integrated {
        private final List<? extends Posterior> posteriors;
        private boolean[] mask;
        private double[] alphas;

        Integrated(List<? extends Posterior> posteriors) {
            this.posteriors = posteriors;
        }

        double[] of(boolean[] which) {
            if (mask == null || !Arrays.equals(mask, which)) {
                boolean any = false;
                for (boolean w : which) {
                    any |= w;
                }
                alphas = any ? exact.selected(posteriors, which) : new double[which.length];
                mask = which.clone();
            }
            return alphas.clone();
        }
    }

    @Override
    public String toString() {
        return "AdaptiveMonteCarlo[maxDraws=" + maxDraws + ", " + policy + "]";
    }
}
