package dev.runoff.engine.best;

import dev.runoff.engine.posterior.BetaPosterior;
import dev.runoff.engine.posterior.Posterior;
import dev.runoff.engine.posterior.StudentTPosterior;
import java.util.ArrayList;
import java.util.List;
import java.util.TreeSet;
import java.util.function.DoubleUnaryOperator;
import org.apache.commons.math3.analysis.integration.IterativeLegendreGaussIntegrator;
import org.apache.commons.math3.distribution.BetaDistribution;
import org.apache.commons.math3.distribution.TDistribution;

/**
 * Independent reference integrals built only from Apache Commons Math 3.6.1: BetaDistribution and
 * TDistribution for densities and distribution functions, IterativeLegendreGaussIntegrator for the
 * quadrature, on pieces cut at each arm's quantiles and support ends (so heavy tails and narrow peaks both
 * get resolved), each mapped by a cosine substitution that smooths end singularities.
 * Test code only; each piece is integrated to 1e-11 relative or 1e-14 absolute accuracy.
 */
final class CommonsMathReference {
    private static final double[] CUTS = {1e-15, 1e-12, 1e-9, 1e-6, 1e-4, 0.001, 0.01, 0.05, 0.1, 0.2, 0.3, 0.4,
        0.5, 0.6, 0.7, 0.8, 0.9, 0.95, 0.99, 0.999, 1 - 1e-4, 1 - 1e-6, 1 - 1e-9, 1 - 1e-12, 1 - 1e-15};

    private final List<Dist> dists = new ArrayList<>();

    CommonsMathReference(List<? extends Posterior> posteriors) {
        for (Posterior p : posteriors) {
            dists.add(Dist.of(p));
        }
    }

    /** alpha_i = integral f_i prod_{j != i} F_j. */
    double alpha(int i) {
        return integrate(x -> {
            double v = dists.get(i).density(x);
            for (int j = 0; j < dists.size(); j++) {
                v *= j == i ? 1 : dists.get(j).cdf(x);
            }
            return v;
        });
    }

    /** integral f_L(x) prod_{j != L} F_j(x + epsilon) dx. */
    double within(int leader, double epsilon) {
        return integrate(x -> {
            double v = dists.get(leader).density(x);
            for (int j = 0; j < dists.size(); j++) {
                v *= j == leader ? 1 : dists.get(j).cdf(x + epsilon);
            }
            return v;
        });
    }

    /** V_i = integral S_i prod_{j != i} F_j. */
    double value(int i) {
        return integrate(x -> {
            double v = 1 - dists.get(i).cdf(x);
            for (int j = 0; j < dists.size(); j++) {
                v *= j == i ? 1 : dists.get(j).cdf(x);
            }
            return v;
        });
    }

    private double integrate(DoubleUnaryOperator f) {
        TreeSet<Double> cuts = new TreeSet<>();
        for (Dist d : dists) {
            for (double p : CUTS) {
                if (!d.bounded() || (p >= 1e-6 && p <= 1 - 1e-6)) {
                    cuts.add(d.quantile(p));
                }
            }
            if (d.bounded()) {
                cuts.add(0.0);
                cuts.add(1.0);
            }
        }
        IterativeLegendreGaussIntegrator integrator = new IterativeLegendreGaussIntegrator(8, 1e-11, 1e-14);
        double sum = 0;
        Double previous = null;
        for (double c : cuts) {
            if (previous != null && c - previous > 1e-12 * Math.max(Math.abs(c), Math.abs(previous))) {
                sum += integrator.integrate(10_000_000, smoothed(f, previous, c), 0, 1);
            }
            previous = c;
        }
        return sum;
    }

    /**
     * The integrand on [lo, hi] after the substitution x = lo + (hi - lo)(1 - cos(pi t))/2, t in [0, 1],
     * whose vanishing derivative at both ends makes inverse-square-root singularities at the ends smooth
     * (Beta densities with a shape below 1).
     */
    private static org.apache.commons.math3.analysis.UnivariateFunction smoothed(DoubleUnaryOperator f,
                                                                             double lo, double hi) {
        return t -> {
            double x = lo + (hi - lo) * (1 - Math.cos(Math.PI * t)) / 2;
            double jacobian = (hi - lo) * Math.PI * Math.sin(Math.PI * t) / 2;
            return jacobian == 0 ? 0 : f.applyAsDouble(x) * jacobian;
        };
    }

    /** A Commons Math distribution in the posterior's coordinates. */
    private interface Dist {
        default boolean bounded() {
            return false;
        }

        double density(double x);

        double cdf(double x);

        double quantile(double p);

        static Dist of(Posterior p) {
            if (p instanceof BetaPosterior b) {
                BetaDistribution d = new BetaDistribution(null, b.a(), b.b(), 1e-15);
                return new Dist() {
                    public boolean bounded() {
                        return true;
                    }

                    public double density(double x) {
                        return x <= 0 || x >= 1 ? 0 : d.density(x);
                    }

                    public double cdf(double x) {
                        return d.cumulativeProbability(x);
                    }

                    public double quantile(double q) {
                        return d.inverseCumulativeProbability(q);
                    }
                };
            }
            StudentTPosterior t = (StudentTPosterior) p;
            TDistribution d = new TDistribution(null, t.dof(), 1e-15);
            return new Dist() {
                public double density(double x) {
                    return d.density((x - t.location()) / t.scale()) / t.scale();
                }

                public double cdf(double x) {
                    return d.cumulativeProbability((x - t.location()) / t.scale());
                }

                public double quantile(double q) {
                    return t.location() + t.scale() * d.inverseCumulativeProbability(q);
                }
            };
        }
    }
}
