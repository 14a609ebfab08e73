package dev.runoff.engine;

import dev.runoff.engine.best.AdaptiveMonteCarlo;
import dev.runoff.engine.best.AlphaReaders;
import dev.runoff.engine.best.DecisionPrecision;
import dev.runoff.engine.best.DrawPolicy;
import dev.runoff.engine.best.DrawSource;
import dev.runoff.engine.best.DrawnArms;
import dev.runoff.engine.best.ExactAlphas;
import dev.runoff.engine.best.ExactProbabilityBest;
import dev.runoff.engine.best.FastExactProbabilityBest;
import dev.runoff.engine.best.LeaderOrder;
import dev.runoff.engine.best.ProbabilityBestEstimator;
import dev.runoff.engine.best.TableDrawSource;
import java.util.Arrays;
import java.util.Objects;
import java.util.Optional;
import java.util.function.Function;
import java.util.stream.Collectors;

/**
 * The arithmetics the engine supports, each named by the version string that decision records carry. A version
 * bundles everything whose bits it fixes: the Monte Carlo estimator's draw policy (first stage and when to stop,
 * {@link DrawPolicy}), its draw source ({@link DrawSource}), which arms it draws from which streams
 * ({@link DrawnArms}) and its integration of arms that win no draw ({@link ExactAlphas}), and the exact
 * estimator. The audit recomputes each record with the version it names.
 *
 * <p>Adding a version: add a constant with its own classes and make it {@link #CURRENT}; never change what an
 * existing constant computes (every record ever written with it must replay bit for bit;
 * {@code EstimatorBitsPinTest} pins 1.2).
 *
 * <p>Shared by every version, on 1.2's arithmetic: the posteriors and their summaries, the allocation rules
 * and guards, {@link dev.runoff.engine.best.ExpectedGain} (value and expected-improvement rules) and
 * {@link dev.runoff.engine.stopping.LeaderWithin} (indifference rule). Neither was the cost the versions were
 * made for (the measured cost was the Monte Carlo draws and the zero-win quadrature), so they stay where 1.2 put
 * them; a version that changes them must route them through this type too.
 */
public enum EngineVersion {

    /** Frozen: 10,000 first-stage draws ordered leader and runner-up ({@link LeaderOrder}), exact samplers, quadrature. */
    V1_2("1.2", readers -> new LeaderOrder(AdaptiveMonteCarlo.FIRST_STAGE), DrawSource.POSTERIOR,
            ExactAlphas.QUADRATURE, new ExactProbabilityBest(), DrawnArms.ALL_ONE_STREAM),

    /**
     * Draws until what the evaluation reads is precise enough ({@link DecisionPrecision}), from the table-based
     * exact Beta sampler ({@link TableDrawSource}: Beta posteriors with both shapes at least 1; every other
     * posterior uses its own sampler), and integrates with {@link FastExactProbabilityBest} (wider panels,
     * pruned nodes, Beta distribution functions by Taylor steps between nodes).
     */
    V1_3("1.3", DecisionPrecision::new, TableDrawSource.always(), ExactAlphas.FAST_QUADRATURE,
            new FastExactProbabilityBest(), DrawnArms.ALL_ONE_STREAM),

    /**
     * 1.3's draw policy, draw source and exact estimator; arms that win no draw are integrated each on its own
     * panels from the peak of its integrand ({@link ExactAlphas#PEAK_QUADRATURE}: no tail ranges to solve, no
     * deeper passes for tiny alphas).
     */
    V1_4("1.4", DecisionPrecision::new, TableDrawSource.always(), ExactAlphas.PEAK_QUADRATURE,
            new FastExactProbabilityBest(), DrawnArms.ALL_ONE_STREAM),

    /**
     * 1.4 with the arms that win no draw integrated to the relative tolerance their consumers need
     * ({@link ExactAlphas#TOLERANCE_QUADRATURE}: 2e-8 rather than about 1e-12), on fewer, wider panels, and
     * each arm drawn from its own stream, with no table and no draws for Beta arms that cannot win a draw but
     * with negligible probability ({@link DrawnArms#LEAVE_OUT_CERTAIN_LOSERS}).
     */
    V1_5("1.5", DecisionPrecision::new, TableDrawSource.always(), ExactAlphas.TOLERANCE_QUADRATURE,
            new FastExactProbabilityBest(), DrawnArms.LEAVE_OUT_CERTAIN_LOSERS),

    /**
     * 1.5 with the arms that win no draw integrated on 1.5's panels to 1.5's tolerance, the integrand carried
     * from node to node by Taylor steps that take no exponential or logarithm
     * ({@link ExactAlphas#SWEPT_QUADRATURE}).
     */
    V1_6("1.6", DecisionPrecision::new, TableDrawSource.always(), ExactAlphas.SWEPT_QUADRATURE,
            new FastExactProbabilityBest(), DrawnArms.LEAVE_OUT_CERTAIN_LOSERS);

    /** The version new evaluations use. */
    public static final EngineVersion CURRENT = V1_6;

    private final String label;
    private final Function<AlphaReaders, DrawPolicy> policy;
    private final DrawSource source;
    private final ExactAlphas zeroWinAlphas;
    private final ProbabilityBestEstimator exact;
    private final DrawnArms arms;

    EngineVersion(String label, Function<AlphaReaders, DrawPolicy> policy, DrawSource source,
                  ExactAlphas zeroWinAlphas, ProbabilityBestEstimator exact, DrawnArms arms) {
        this.label = label;
        this.policy = policy;
        this.source = source;
        this.zeroWinAlphas = zeroWinAlphas;
        this.exact = exact;
        this.arms = arms;
    }

    /** The version string records carry, e.g. {@code 1.3}. */
    public String label() {
        return label;
    }

    /** The exact estimator of this version (stateless, shared). */
    public ProbabilityBestEstimator exact() {
        return exact;
    }

    /**
     * This version's Monte Carlo estimator for an evaluation that reads the alphas as {@code readers} says, with
     * at most {@code maxDraws} joint draws.
     *
     * @throws IllegalArgumentException if {@code maxDraws < 1}
     */
    public AdaptiveMonteCarlo monteCarlo(int maxDraws, AlphaReaders readers) {
        return new AdaptiveMonteCarlo(maxDraws, policy.apply(Objects.requireNonNull(readers, "readers")), source,
                zeroWinAlphas, arms);
    }

    /** The version whose {@link #label()} is {@code label}, if this engine supports it. */
    public static Optional<EngineVersion> find(String label) {
        return Arrays.stream(values()).filter(v -> v.label.equals(label)).findFirst();
    }

    /**
     * The version whose {@link #label()} is {@code label}.
     *
     * @throws IllegalArgumentException naming the value and the supported versions when there is none
     */
    public static EngineVersion of(String label) {
        return find(label).orElseThrow(() -> new IllegalArgumentException("engine version '" + label
                + "' is not supported; supported: " + supported()));
    }

    /** The supported version strings, oldest first, e.g. {@code 1.2, 1.3}. */
    public static String supported() {
        return Arrays.stream(values()).map(EngineVersion::label).collect(Collectors.joining(", "));
    }
}
