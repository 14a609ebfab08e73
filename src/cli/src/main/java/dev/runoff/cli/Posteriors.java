package dev.runoff.cli;

import dev.runoff.engine.posterior.BetaPosterior;
import dev.runoff.engine.posterior.BetaPrior;
import dev.runoff.engine.posterior.NormalGammaPrior;
import dev.runoff.engine.posterior.Posterior;
import dev.runoff.engine.posterior.Prior;
import dev.runoff.engine.posterior.StudentTPosterior;
import java.util.LinkedHashMap;
import java.util.Locale;
import java.util.Map;

/** Names and parameters of priors and posteriors, for reports. */
final class Posteriors {
    private Posteriors() {
    }

    /** The family and parameters of a posterior, in a stable order. */
    static Map<String, Object> parameters(Posterior p) {
        Map<String, Object> m = new LinkedHashMap<>();
        if (p instanceof BetaPosterior b) {
            m.put("family", "beta");
            m.put("a", b.a());
            m.put("b", b.b());
        } else if (p instanceof StudentTPosterior t) {
            m.put("family", "student-t");
            m.put("location", t.location());
            m.put("scale", t.scale());
            m.put("degreesOfFreedom", t.dof());
        } else {
            m.put("family", p.getClass().getSimpleName());
        }
        return m;
    }

    /** A short description of a prior, e.g. {@code Beta(1, 1)}. */
    static String describe(Prior prior) {
        if (prior instanceof BetaPrior b) {
            return String.format(Locale.ROOT, "Beta(%s, %s)", number(b.a()), number(b.b()));
        }
        NormalGammaPrior g = (NormalGammaPrior) prior;
        return String.format(Locale.ROOT, "Normal-Gamma(mu0 %s, kappa0 %s, alpha0 %s, beta0 %s)",
                number(g.mu0()), number(g.kappa0()), number(g.alpha0()), number(g.beta0()));
    }

    /** A number without a trailing ".0" when it is whole. */
    static String number(double x) {
        return x == Math.rint(x) && Math.abs(x) < 1e15 ? Long.toString((long) x) : Double.toString(x);
    }
}
