package dev.runoff.audit;

import dev.runoff.decision.EstimatedArms;
import dev.runoff.engine.best.ExactProbabilityBest;
import dev.runoff.engine.best.ProbabilityBest;
import dev.runoff.engine.posterior.BetaPosterior;
import dev.runoff.engine.posterior.Posterior;
import dev.runoff.engine.posterior.StudentTPosterior;
import dev.runoff.records.avro.ArmState;
import dev.runoff.records.avro.BetaParams;
import dev.runoff.records.avro.DecisionRecord;
import dev.runoff.records.avro.EstimationMethod;
import dev.runoff.records.avro.StudentTParams;
import java.util.ArrayList;
import java.util.List;
import java.util.Locale;

/**
 * The exact cross-check of Monte Carlo estimates ({@code audit verify --cross-check}): for every valid record
 * whose probabilities of being best were estimated by Monte Carlo, the probabilities are integrated exactly
 * ({@link ExactProbabilityBest}) from the posteriors the record states, and every arm whose recorded alpha
 * lies more than {@code sigmas} of its recorded standard errors (plus {@value #SLACK} for the integration
 * and rounding) from the exact value is a {@link Check#CROSS_CHECK} finding. The recorded decision is not
 * changed: the check says whether the estimator behaved like an unbiased estimator with the standard errors
 * it claims (over the arms the job estimated them for: see {@link #exact}). A correct estimator misses by more than 5 standard errors with probability about 5.7e-7 per
 * arm (normal approximation, common practice).
 */
final class CrossCheck {

    /** Allowance for the exact integration's own error and the recorded rounding onto [0, 1]. */
    static final double SLACK = 1e-9;

    private final double sigmas;

    /** A cross-check flagging estimates more than {@code sigmas} standard errors away, {@code sigmas > 0}. */
    CrossCheck(double sigmas) {
        if (!(sigmas > 0) || Double.isInfinite(sigmas)) {
            throw new IllegalArgumentException("cross-check sigmas must be finite and > 0, got " + sigmas);
        }
        this.sigmas = sigmas;
    }

    /** The findings over one experiment's entries; invalid and exactly integrated records are skipped. */
    List<Finding> check(List<Entry> entries) {
        List<Finding> findings = new ArrayList<>();
        for (int i = 0; i < entries.size(); i++) {
            Entry entry = entries.get(i);
            if (entry.isValid() && entry.record().getMethod() == EstimationMethod.MONTE_CARLO) {
                check(i, entry, findings);
            }
        }
        return findings;
    }

    private void check(int index, Entry entry, List<Finding> findings) {
        DecisionRecord record = entry.record();
        List<ArmState> arms = record.getArms();
        ProbabilityBest exact = exact(arms);
        for (int i = 0; i < arms.size(); i++) {
            ArmState arm = arms.get(i);
            double distance = Math.abs(arm.getAlpha() - exact.alpha(i));
            if (distance > sigmas * arm.getAlphaStandardError() + SLACK) {
                findings.add(Finding.of(index, entry, Check.CROSS_CHECK, "arms[" + i + "].alpha", String.format(
                        Locale.ROOT, "arm %s: Monte Carlo alpha %.6g with standard error %.3g (%d draws) lies %s"
                                + " from the exact %.6g, more than the allowed %s standard errors",
                        arm.getArm(), arm.getAlpha(), arm.getAlphaStandardError(), record.getDraws(),
                        distanceInErrors(distance, arm.getAlphaStandardError()), exact.alpha(i), number(sigmas))));
            }
        }
    }

    private static String distanceInErrors(double distance, double standardError) {
        return standardError > 0 ? String.format(Locale.ROOT, "%.1f standard errors", distance / standardError)
                : String.format(Locale.ROOT, "%.3g (its standard error is 0)", distance);
    }

    private static String number(double value) {
        return String.format(Locale.ROOT, "%.4g", value);
    }

    /**
     * The probabilities of being best integrated exactly from the posteriors {@code arms} state, over the arms
     * the job estimated them for ({@link EstimatedArms}: a suspended arm gets alpha 0 and the others' alphas
     * are among themselves), so that like is compared with like.
     */
    static ProbabilityBest exact(List<ArmState> arms) {
        List<Integer> kept = EstimatedArms.of(EstimatedArms.suspended(arms));
        if (kept.size() == arms.size()) {
            return new ExactProbabilityBest().estimate(posteriors(arms), 0);
        }
        ProbabilityBest sub = new ExactProbabilityBest().estimate(posteriors(kept.stream().map(arms::get).toList()), 0);
        double[] alpha = new double[arms.size()];
        for (int k = 0; k < kept.size(); k++) {
            alpha[kept.get(k)] = sub.alpha(k);
        }
        return new ProbabilityBest(alpha, new double[arms.size()], sub.method(), sub.draws());
    }

    /** The posteriors the record states, in arm order. */
    private static List<Posterior> posteriors(List<ArmState> arms) {
        List<Posterior> posteriors = new ArrayList<>(arms.size());
        for (ArmState arm : arms) {
            Object p = arm.getPosterior();
            posteriors.add(p instanceof BetaParams b ? new BetaPosterior(b.getA(), b.getB())
                    : tPosterior((StudentTParams) p));
        }
        return posteriors;
    }

    private static Posterior tPosterior(StudentTParams t) {
        return new StudentTPosterior(t.getLocation(), t.getScale(), t.getDegreesOfFreedom());
    }
}
