package dev.runoff.engine.posterior;

import org.apache.commons.rng.UniformRandomProvider;
import org.apache.commons.rng.sampling.distribution.AhrensDieterMarsagliaTsangGammaSampler;
import org.apache.commons.rng.sampling.distribution.ChengBetaSampler;
import org.apache.commons.rng.sampling.distribution.ContinuousSampler;
import org.apache.commons.rng.sampling.distribution.ZigguratSampler;

/** Seeded samplers of the posterior families. */
final class Samplers {
    private Samplers() {
    }

    static Posterior.Sampler beta(UniformRandomProvider rng, double a, double b) {
        return ChengBetaSampler.of(rng, a, b)::sample;
    }

    static Posterior.Sampler studentT(UniformRandomProvider rng, double location, double scale, double dof) {
        ZigguratSampler.NormalizedGaussian normal = ZigguratSampler.NormalizedGaussian.of(rng);
        ContinuousSampler chiSquare = AhrensDieterMarsagliaTsangGammaSampler.of(rng, dof / 2.0, 2.0);
        return () -> location + scale * normal.sample() / Math.sqrt(chiSquare.sample() / dof);
    }
}
