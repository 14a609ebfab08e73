package dev.runoff.engine.best;

import dev.runoff.engine.posterior.BetaPosterior;
import dev.runoff.engine.posterior.Posterior;
import java.util.ArrayList;
import java.util.List;

/**
 * What one engine version's exact integration does differently from another's, around the shared
 * quadrature of {@link ExactProbabilityBest}: how the posteriors are evaluated and which arms a deeper pass
 * integrates again. Engine version 1.2's scheme must keep its output bits (records are replayed bit for bit).
 */
abstract class ExactScheme {
    /**
     * Engine version 1.3's panels: 20 points on panels of factor 8 (2.5 points per unit of factor, as 10 on
     * 2.5 in version 1.2), over the centres of Beta arms already in range, with {@link PrunedNodes}. Against
     * a run on 20 points and factor 2.5, alphas of 1,000 experiments of the recompute pool moved by up to
     * 1.7e-13 relative with 20 points on 8, 2.8e-12 with 24 on 12 (2.0 points per unit), measured before
     * the Taylor steps of {@code CachedIncompleteBeta}.
     */
    private static final ExactIntegrator.Panels PANELS_1_3 = new ExactIntegrator.Panels(20, 8, true, true);

    /** Engine version 1.2: the posteriors as given; every deeper pass integrates every selected arm again. */
    static final ExactScheme ENGINE_1_2 = new ExactScheme() {
        @Override
        List<? extends Posterior> view(List<? extends Posterior> posteriors) {
            return posteriors;
        }

        @Override
        Posterior mirror(Posterior p) {
            return mirrored(p);
        }

        @Override
        boolean[] again(boolean[] which, double[] alpha, double logTail) {
            return which;
        }

        @Override
        double[] merge(double[] previous, boolean[] again, double[] deeper) {
            return deeper;
        }

        @Override
        ExactIntegrator.Panels panels() {
            return ExactIntegrator.Panels.ENGINE_1_2;
        }
    };

    /**
     * Engine version 1.3: Beta posteriors through {@link CachedBeta} (Taylor steps between nodes); the panels
     * of {@link #PANELS_1_3}; a deeper pass integrates again only the arms whose alpha failed the check of
     * the last pass (the others already have theirs to the accuracy the check asks for) and keeps the
     * others' alphas.
     */
    static final ExactScheme ENGINE_1_3 = new ExactScheme() {
        @Override
        List<? extends Posterior> view(List<? extends Posterior> posteriors) {
            List<Posterior> seen = new ArrayList<>(posteriors.size());
            for (Posterior p : posteriors) {
                seen.add(CachedBeta.of(p));
            }
            return seen;
        }

        @Override
        Posterior mirror(Posterior p) {
            return CachedBeta.of(mirrored(p instanceof CachedBeta c ? c.beta() : p));
        }

        @Override
        boolean[] again(boolean[] which, double[] alpha, double logTail) {
            boolean[] failed = new boolean[which.length];
            for (int i = 0; i < which.length; i++) {
                failed[i] = which[i] && ExactProbabilityBest.tooSmall(alpha[i], logTail);
            }
            return failed;
        }

        @Override
        double[] merge(double[] previous, boolean[] again, double[] deeper) {
            double[] out = previous.clone();
            for (int i = 0; i < out.length; i++) {
                if (again[i]) {
                    out[i] = deeper[i];
                }
            }
            return out;
        }

        @Override
        ExactIntegrator.Panels panels() {
            return PANELS_1_3;
        }
    };

    /** The posteriors the integrals evaluate. */
    abstract List<? extends Posterior> view(List<? extends Posterior> posteriors);

    /** The posterior of {@code 1 - theta} for a Beta posterior of theta, as the integrals evaluate it. */
    abstract Posterior mirror(Posterior p);

    /** The arms a deeper pass integrates, given the selected arms and alphas of the last pass. */
    abstract boolean[] again(boolean[] which, double[] alpha, double logTail);

    /** The alphas after a deeper pass over the arms {@code again}. */
    abstract double[] merge(double[] previous, boolean[] again, double[] deeper);

    /** The panels of the quadrature. */
    abstract ExactIntegrator.Panels panels();

    /** {@code Beta(b, a)}, the posterior of {@code 1 - theta}. */
    static BetaPosterior mirrored(Posterior p) {
        BetaPosterior beta = (BetaPosterior) p;
        return new BetaPosterior(beta.b(), beta.a());
    }
}
