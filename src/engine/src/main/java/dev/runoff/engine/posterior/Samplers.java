package dev.runoff.engine.posterior;

import org.apache.commons.rng.UniformRandomProvider;
import org.apache.commons.rng.sampling.distribution.ZigguratSampler;

/**
 * Exact, seeded samplers of the posterior families.
 *
 * <p>Design: both families reduce to Gamma variates. A Beta(a, b) draw is {@code X / (X + Y)} with
 * independent {@code X ~ Gamma(a)}, {@code Y ~ Gamma(b)}; a location-scale Student-t draw with {@code nu}
 * degrees of freedom is {@code location + scale * Z / sqrt(G / k)} with {@code Z} standard normal,
 * {@code k = nu / 2} and {@code G ~ Gamma(k)} (so that {@code 2G} is chi-square with {@code nu} degrees of
 * freedom). Both identities are exact (Devroye 1986, "Non-Uniform Random Variate Generation", chapter IX,
 * from memory).
 *
 * <p>Gamma variates come from Marsaglia &amp; Tsang (2000), "A simple method for generating gamma variables",
 * ACM Transactions on Mathematical Software 26(3): a normal draw through a cubic transform, accepted by a
 * cheap polynomial squeeze in almost every case, so that a logarithm is needed only on the rare fall-back
 * test. Normals come from the modified ziggurat of Commons RNG (McFarland 2016, "A modified ziggurat
 * algorithm for generating exponentially and normally distributed pseudorandom numbers"). Shapes below 1
 * use the boost of the same paper, {@code Gamma(a) = Gamma(a + 1) * U^(1/a)}, carried out in log space so
 * that a draw underflowing double precision cannot turn a Beta ratio into {@code 0 / 0}.
 *
 * <p>Every sampler draws its variates from the generator in a fixed order, so a sequence of draws is a
 * pure function of the parameters and the generator's state. Instances are not thread-safe. The code here
 * uses StrictMath only; the Commons RNG ziggurat uses {@code Math.exp} in its rare edge tests (an
 * accept/reject decision, not a returned value), so a JVM whose {@code Math.exp} differs by an ulp could in
 * principle take another branch when a uniform lands within that ulp (about 2^-52 per edge test).
 */
final class Samplers {
    private Samplers() {
    }

    /** An exact sampler of Beta({@code a}, {@code b}), {@code a, b > 0}. */
    static Posterior.Sampler beta(UniformRandomProvider rng, double a, double b) {
        ZigguratSampler.NormalizedGaussian normal = ZigguratSampler.NormalizedGaussian.of(rng);
        if (a >= 1 && b >= 1) {
            return new GammaRatioBeta(new MarsagliaTsang(rng, normal, a), new MarsagliaTsang(rng, normal, b));
        }
        return new LogGammaRatioBeta(LogGamma.of(rng, normal, a), LogGamma.of(rng, normal, b));
    }

    /** An exact sampler of the Student-t with {@code dof > 0} degrees of freedom, shifted and scaled. */
    static Posterior.Sampler studentT(UniformRandomProvider rng, double location, double scale, double dof) {
        ZigguratSampler.NormalizedGaussian normal = ZigguratSampler.NormalizedGaussian.of(rng);
        double k = dof / 2.0;
        if (k >= 1) {
            return new GammaStudentT(normal, new MarsagliaTsang(rng, normal, k), location, scale, k);
        }
        return new LogGammaStudentT(normal, LogGamma.of(rng, normal, k), location, scale, StrictMath.log(k));
    }

    /** A uniform draw in the open interval (0, 1): 53 random bits, offset by half a step. */
    static double openUniform(UniformRandomProvider rng) {
        return ((rng.nextLong() >>> 11) + 0.5) * 0x1.0p-53;
    }

    /**
     * Marsaglia &amp; Tsang (2000) Gamma(shape) for {@code shape >= 1}: with {@code d = shape - 1/3} and
     * {@code c = 1 / sqrt(9d)}, draw a normal {@code x} with {@code v = (1 + c x)^3 > 0} and a uniform
     * {@code u}; accept {@code d v} if {@code u < 1 - 0.0331 x^4} (the squeeze) or
     * {@code log u < x^2 / 2 + d (1 - v + log v)} (the exact test); otherwise try again.
     */
    static final class MarsagliaTsang {
        private final UniformRandomProvider rng;
        private final ZigguratSampler.NormalizedGaussian normal;
        private final double d;
        private final double c;

        MarsagliaTsang(UniformRandomProvider rng, ZigguratSampler.NormalizedGaussian normal, double shape) {
            this.rng = rng;
            this.normal = normal;
            this.d = shape - 1.0 / 3.0;
            this.c = 1.0 / StrictMath.sqrt(9.0 * d);
        }

        double sample() {
            while (true) {
                double x = normal.sample();
                double v = 1.0 + c * x;
                if (v > 0) {
                    v = v * v * v;
                    double u = openUniform(rng);
                    double x2 = x * x;
                    if (u < 1.0 - 0.0331 * x2 * x2
                            || StrictMath.log(u) < 0.5 * x2 + d * (1.0 - v + StrictMath.log(v))) {
                        return d * v;
                    }
                }
            }
        }
    }

    /**
     * Natural log of a Gamma(shape) draw for any {@code shape > 0}; below 1 the Marsaglia &amp; Tsang boost
     * {@code log Gamma(shape + 1) + log(U) / shape}, which stays finite where the draw itself underflows.
     */
    static final class LogGamma {
        private final UniformRandomProvider rng;
        private final MarsagliaTsang gamma;
        private final double inverseShape;

        private LogGamma(UniformRandomProvider rng, MarsagliaTsang gamma, double inverseShape) {
            this.rng = rng;
            this.gamma = gamma;
            this.inverseShape = inverseShape;
        }

        static LogGamma of(UniformRandomProvider rng, ZigguratSampler.NormalizedGaussian normal, double shape) {
            if (shape >= 1) {
                return new LogGamma(rng, new MarsagliaTsang(rng, normal, shape), 0.0);
            }
            return new LogGamma(rng, new MarsagliaTsang(rng, normal, shape + 1.0), 1.0 / shape);
        }

        double sample() {
            double logGamma = StrictMath.log(gamma.sample());
            if (inverseShape == 0.0) {
                return logGamma;
            }
            return logGamma + StrictMath.log(openUniform(rng)) * inverseShape;
        }
    }

    /** Beta(a, b) as {@code X / (X + Y)}, for {@code a, b >= 1} where neither Gamma draw can underflow. */
    private record GammaRatioBeta(MarsagliaTsang x, MarsagliaTsang y) implements Posterior.Sampler {
        @Override
        public double draw() {
            double gx = x.sample();
            return gx / (gx + y.sample());
        }
    }

    /** Beta(a, b) as {@code 1 / (1 + exp(log Y - log X))}, for a shape below 1. */
    private record LogGammaRatioBeta(LogGamma x, LogGamma y) implements Posterior.Sampler {
        @Override
        public double draw() {
            double logX = x.sample();
            return 1.0 / (1.0 + StrictMath.exp(y.sample() - logX));
        }
    }

    /** Student-t as {@code location + scale * Z * sqrt(k / G)} with {@code G ~ Gamma(k)}, {@code k >= 1}. */
    private record GammaStudentT(ZigguratSampler.NormalizedGaussian normal, MarsagliaTsang gamma,
                                 double location, double scale, double k) implements Posterior.Sampler {
        @Override
        public double draw() {
            double z = normal.sample();
            return location + scale * z * StrictMath.sqrt(k / gamma.sample());
        }
    }

    /** Student-t for {@code k < 1}: the factor {@code sqrt(k / G) = exp((log k - log G) / 2)} in log space. */
    private record LogGammaStudentT(ZigguratSampler.NormalizedGaussian normal, LogGamma logGamma,
                                    double location, double scale, double logK) implements Posterior.Sampler {
        @Override
        public double draw() {
            double z = normal.sample();
            return location + scale * z * StrictMath.exp(0.5 * (logK - logGamma.sample()));
        }
    }
}
