package dev.runoff.engine.best;

import dev.runoff.engine.posterior.BetaPosterior;
import dev.runoff.engine.posterior.Posterior;
import java.util.ArrayList;
import java.util.List;
import java.util.SplittableRandom;

/** Random Beta arms for the integration and draw tests (invented data). */
final class TestArms {
    private TestArms() {
    }

    /** The recompute pool's shapes (RecomputeBench): five arms, 2,000 to 20,000 trials, rates of 2% to 12%. */
    static List<Posterior> poolShaped(SplittableRandom random) {
        List<Posterior> arms = new ArrayList<>();
        for (int arm = 0; arm < 5; arm++) {
            long trials = 2_000 + random.nextInt(18_000);
            long wins = Math.round(trials * (0.02 + 0.1 * random.nextDouble()));
            arms.add(new BetaPosterior(1 + wins, 1 + trials - wins));
        }
        return arms;
    }

    /**
     * Two to eight arms with 1 to 30,000 trials and rates from 0.1% to 60% (wide, narrow and skewed posteriors),
     * {@code prior} added to both shapes.
     */
    static List<Posterior> anyShape(SplittableRandom random, double prior) {
        int k = 2 + random.nextInt(7);
        List<Posterior> arms = new ArrayList<>();
        for (int arm = 0; arm < k; arm++) {
            long trials = 1 + random.nextInt(30_000);
            long wins = Math.round(trials * (0.001 + 0.6 * random.nextDouble() * random.nextDouble()));
            arms.add(new BetaPosterior(prior + wins, prior + trials - wins));
        }
        return arms;
    }
}
