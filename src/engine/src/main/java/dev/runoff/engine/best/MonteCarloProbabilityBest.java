package dev.runoff.engine.best;

import dev.runoff.engine.posterior.BlockSampler;
import dev.runoff.engine.posterior.Posterior;
import java.util.Arrays;
import java.util.List;
import java.util.Objects;
import org.apache.commons.rng.UniformRandomProvider;
import org.apache.commons.rng.simple.RandomSource;

/**
 * Seeded Monte Carlo estimate of the probability that each arm is best.
 *
 * <p>Each of the {@code M} joint draws takes one value from every arm's posterior and credits the arm with
 * the largest value; {@code alpha_i = count_i / M} with binomial standard error
 * {@code sqrt(alpha_i (1 - alpha_i) / M)}. Ties (possible only through rounding, or for identical
 * degenerate draws) go to the lowest arm index, so the result never depends on anything but the draws.
 *
 * <p>Reproducibility: the random stream is {@code RandomSource.XO_SHI_RO_256_PP.create(seed)}, shared by the
 * arms' samplers. Draws are made in blocks of {@value #BLOCK}: within a block, arm 0 fills its values first,
 * then arm 1, and so on. The result is a pure function of (posteriors, draws, seed) and bit-identical on
 * repeat; changing the block size or the order would change the bits (not the distribution).
 */
public final class MonteCarloProbabilityBest implements ProbabilityBestEstimator {
    /** Joint draws per block; the running maximum of a block stays in the first-level cache. */
    static final int BLOCK = 1024;

    private final int draws;
    private final DrawSource source;

    /**
     * An estimator using {@code draws} joint posterior draws from each posterior's own sampler.
     *
     * @param draws number of joint draws M, {@code >= 1}
     * @throws IllegalArgumentException if {@code draws < 1}
     */
    public MonteCarloProbabilityBest(int draws) {
        this(draws, DrawSource.POSTERIOR);
    }

    /**
     * An estimator using {@code draws} joint posterior draws from {@code source}.
     *
     * @param draws  number of joint draws M, {@code >= 1}
     * @param source how each posterior is sampled
     * @throws IllegalArgumentException if {@code draws < 1}
     */
    public MonteCarloProbabilityBest(int draws, DrawSource source) {
        if (draws < 1) {
            throw new IllegalArgumentException("draws must be >= 1, got " + draws);
        }
        this.draws = draws;
        this.source = Objects.requireNonNull(source, "source");
    }

    /** Number of joint draws per estimate. */
    public int draws() {
        return draws;
    }

    /**
     * Alpha for each posterior, from {@link #draws()} joint draws seeded by {@code seed}.
     *
     * @throws IllegalArgumentException if fewer than two posteriors are given or one is null
     */
    @Override
    public ProbabilityBest estimate(List<? extends Posterior> posteriors, long seed) {
        Posterior.Sampler[] samplers = samplers(posteriors, RandomSource.XO_SHI_RO_256_PP.create(seed), source);
        long[] wins = countWins(samplers);
        double[] alpha = new double[wins.length];
        double[] standardError = new double[wins.length];
        for (int i = 0; i < wins.length; i++) {
            alpha[i] = (double) wins[i] / draws;
            standardError[i] = StrictMath.sqrt(alpha[i] * (1.0 - alpha[i]) / draws);
        }
        return new ProbabilityBest(alpha, standardError, ProbabilityBest.Method.MONTE_CARLO, draws);
    }

    static Posterior.Sampler[] samplers(List<? extends Posterior> posteriors, UniformRandomProvider rng,
                                        DrawSource source) {
        check(posteriors);
        Posterior.Sampler[] samplers = new Posterior.Sampler[posteriors.size()];
        for (int i = 0; i < samplers.length; i++) {
            samplers[i] = source.sampler(posteriors.get(i), rng);
        }
        return samplers;
    }

    /**
     * Checks that there are at least two posteriors and none is null.
     *
     * @throws IllegalArgumentException naming what is wrong
     */
    static void check(List<? extends Posterior> posteriors) {
        if (posteriors == null || posteriors.size() < 2) {
            throw new IllegalArgumentException("need at least 2 posteriors, got "
                    + (posteriors == null ? "null" : posteriors.size()));
        }
        for (int i = 0; i < posteriors.size(); i++) {
            if (posteriors.get(i) == null) {
                throw new IllegalArgumentException("posterior of arm " + i + " is null");
            }
        }
    }

    /** Wins per arm over all draws; the only allocations are the buffers made before the loop. */
    private long[] countWins(Posterior.Sampler[] samplers) {
        long[] wins = new long[samplers.length];
        addWins(samplers, draws, wins);
        return wins;
    }

    /**
     * Adds to {@code wins} the winners of {@code count} further joint draws from {@code samplers}, in blocks of
     * {@value #BLOCK} starting afresh at the first draw of this call (the layout {@link AdaptiveMonteCarlo}
     * relies on to continue a stream stage by stage).
     */
    static void addWins(Posterior.Sampler[] samplers, int count, long[] wins) {
        double[] best = new double[BLOCK];
        double[] drawn = new double[BLOCK];
        int[] winner = new int[BLOCK];
        for (int start = 0; start < count; start += BLOCK) {
            int n = Math.min(BLOCK, count - start);
            draw(samplers[0], best, n);
            Arrays.fill(winner, 0, n, 0);
            for (int arm = 1; arm < samplers.length; arm++) {
                draw(samplers[arm], drawn, n);
                challenge(drawn, arm, best, winner, n);
            }
            for (int j = 0; j < n; j++) {
                wins[winner[j]]++;
            }
        }
    }

    /**
     * Writes {@code n} draws of {@code sampler} to {@code out}: one {@link BlockSampler#fill} call where the
     * sampler offers it (the same values in the same order as {@code n} draws, so no bit depends on which).
     */
    private static void draw(Posterior.Sampler sampler, double[] out, int n) {
        if (sampler instanceof BlockSampler block) {
            block.fill(out, n);
            return;
        }
        for (int j = 0; j < n; j++) {
            out[j] = sampler.draw();
        }
    }

    /** Strictly greater wins, so a tie keeps the earlier (lower-index) arm. */
    private static void challenge(double[] drawn, int arm, double[] best, int[] winner, int n) {
        for (int j = 0; j < n; j++) {
            double v = drawn[j];
            if (v > best[j]) {
                best[j] = v;
                winner[j] = arm;
            }
        }
    }

    @Override
    public String toString() {
        return "MonteCarloProbabilityBest[draws=" + draws + "]";
    }
}
