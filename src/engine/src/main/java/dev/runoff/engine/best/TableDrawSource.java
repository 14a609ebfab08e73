package dev.runoff.engine.best;

import dev.runoff.engine.posterior.BetaPosterior;
import dev.runoff.engine.posterior.BetaTableSampler;
import dev.runoff.engine.posterior.Posterior;
import org.apache.commons.rng.UniformRandomProvider;

/**
 * A draw source that samples the Beta posteriors {@link BetaTableSampler} supports (both shapes at least 1,
 * their sum at most {@value BetaTableSampler#MAX_SHAPE_SUM}) by that sampler (a table built per estimate and
 * arm, then about two random words per draw), and every other posterior (a shape below 1, Student-t) by its
 * own sampler. The draws differ from {@link DrawSource#POSTERIOR}'s (same distribution, other bits), so this
 * source belongs to a new engine version, never to 1.2.
 *
 * <p>Building a table costs about as much as 500 to 1,000 draws of the posterior's own sampler (measured side
 * by side: src/docs/performance.md); {@link #forDraws} falls back to the posterior's own sampler below
 * {@value #MIN_DRAWS} draws per arm, where the table would not pay for itself.
 */
public final class TableDrawSource implements DrawSource {
    /** Draws per arm from which the table pays for its construction (measured: src/docs/performance.md). */
    public static final int MIN_DRAWS = 1_000;

    private static final TableDrawSource INSTANCE = new TableDrawSource();

    private TableDrawSource() {
    }

    /** The table source, whatever the number of draws. */
    public static DrawSource always() {
        return INSTANCE;
    }

    /** The table source for {@code draws >= MIN_DRAWS} draws per arm, {@link DrawSource#POSTERIOR} below. */
    public static DrawSource forDraws(int draws) {
        return draws >= MIN_DRAWS ? INSTANCE : DrawSource.POSTERIOR;
    }

    @Override
    public Posterior.Sampler sampler(Posterior posterior, UniformRandomProvider rng) {
        if (posterior instanceof BetaPosterior beta && BetaTableSampler.supports(beta.a(), beta.b())) {
            return BetaTableSampler.of(rng, beta.a(), beta.b());
        }
        return posterior.sampler(rng);
    }

    @Override
    public String toString() {
        return "TableDrawSource";
    }
}
