package dev.runoff.engine.stopping;







import dev.runoff.engine.core.Arm;
import dev.runoff.engine.core.Checks;
import dev.runoff.engine.core.WilsonBound;
import dev.runoff.engine.best.ProbabilityBest;
import java.util.List;
import java.util.Objects;

/**
 * Entry point: decides CONTINUE or STOP for one experiment at one evaluation.
 *
 * <p>Order of the checks: if the configured rule fires and both guards (minimum trials per arm, minimum
 * duration) are met, STOP with the rule's reason. Otherwise, if the trial budget or the deadline is spent,
 * STOP with reason {@link VerdictReason#BUDGET}, naming the arm with the largest alpha. Otherwise CONTINUE, with
 * reason {@link VerdictReason#MIN_TRIALS} or {@link VerdictReason#MIN_DURATION} when only a guard held the rule back, or
 * {@link VerdictReason#BELOW_THRESHOLD}. A pure function of its arguments.
 */
public final class StoppingCheck {
    private StoppingCheck() {
    }

    /**
     * Verdict for the GLR or posterior rule, which need no {@link LeaderConfidence}.
     *
     * @throws IllegalArgumentException if the configured rule is {@link Rule#INDIFFERENCE}, or on bad input
     */
    public static Verdict decide(List<Arm> arms, ProbabilityBest best, Timing timing, StoppingConfig config) {
        return decide(arms, best, timing, config, (leader, epsilon) -> {
            throw new IllegalArgumentException("the indifference rule needs a LeaderConfidence");
        });
    }

    /**
     * Verdict for any rule.
     *
     * @param arms       at least two arms, all Bernoulli or all value statistics
     * @param best       probability that each arm is best, in arm order
     * @param timing     start of the experiment and time of this evaluation
     * @param config     rule, delta, guards and budget
     * @param confidence probability that a leader is within epsilon of the best (used by the indifference
     *                   rule only)
     */
    public static Verdict decide(List<Arm> arms, ProbabilityBest best, Timing timing, StoppingConfig config,
                                  LeaderConfidence confidence) {
        Objects.requireNonNull(timing, "timing");
        Objects.requireNonNull(config, "config");
        Objects.requireNonNull(confidence, "confidence");
        checkAlpha(arms, best);
        GuardState guards = guards(arms, timing, config);
        Evaluation e = evaluate(arms, best, config, confidence);
        if (e.fired() && guards.minTrialsMet() && guards.minDurationMet()) {
            return decision(VerdictReason.firing(config.rule()), e.leader(), e, arms, best, config, guards);
        }
        if (guards.budgetExhausted()) {
            return decision(VerdictReason.BUDGET, argmax(best), e, arms, best, config, guards);
        }
        return decision(continueReason(e, guards), e.leader(), e, arms, best, config, guards);
    }

    private static VerdictReason continueReason(Evaluation e, GuardState guards) {
        if (!e.fired()) {
            return VerdictReason.BELOW_THRESHOLD;
        }
        return guards.minTrialsMet() ? VerdictReason.MIN_DURATION : VerdictReason.MIN_TRIALS;
    }

    private static Verdict decision(VerdictReason reason, int leader, Evaluation e, List<Arm> arms, ProbabilityBest best,
                                     StoppingConfig config, GuardState guards) {
        return new Verdict(reason, config.rule(), leader, arms.get(leader).name(), e.statistic(), e.threshold(),
                best.alpha(leader), guards);
    }

    private static Evaluation evaluate(List<Arm> arms, ProbabilityBest best, StoppingConfig config,
                                       LeaderConfidence confidence) {
        return switch (config.rule()) {
            case GLR -> glr(arms, config, config.glrThreshold());
            case GLR_HEURISTIC -> glr(arms, config, GlrThreshold.LIGHTER_NOT_PROVEN);
            case MIXTURE -> mixture(arms, config);
            case SEQUENTIAL_T -> sequentialT(arms, config);
            case POSTERIOR -> posterior(best, config);
            case INDIFFERENCE -> indifference(best, config, confidence);
        };
    }

    /**
     * GLR rule (Garivier &amp; Kaufmann 2016, section 3): fires when {@code Z(t) > beta(t, delta)}. Evaluated
     * at t = 1 when no arm has trials yet; Z is then 0 and the rule cannot fire.
     */
    private static Evaluation glr(List<Arm> arms, StoppingConfig config, GlrThreshold glrThreshold) {
        Glr.Statistic z = Glr.statistic(arms);
        double threshold = glrThreshold.value(z.metric(), Math.max(1, z.trials()), arms.size(),
                config.delta());
        return new Evaluation(z.leader(), z.value(), threshold, z.value() > threshold);
    }

    /** Mixture-martingale rule ({@link Mixture}): fires when {@code min_b log M_ab >= log((K - 1) / delta)}. */
    private static Evaluation mixture(List<Arm> arms, StoppingConfig config) {
        Glr.Statistic m = Mixture.statistic(arms);
        double threshold = Mixture.threshold(arms.size(), config.delta());
        return new Evaluation(m.leader(), m.value(), threshold, m.value() >= threshold);
    }

    /** t confidence sequences ({@link SequentialT}): fire when {@code min_b separation_ab >= log(K / delta)}. */
    private static Evaluation sequentialT(List<Arm> arms, StoppingConfig config) {
        Glr.Statistic s = SequentialT.statistic(arms);
        double threshold = SequentialT.threshold(arms.size(), config.delta());
        return new Evaluation(s.leader(), s.value(), threshold, s.value() >= threshold);
    }

    /**
     * Posterior rule: fires when a lower confidence bound of {@code alpha_max} reaches {@code 1 - delta}. For
     * Monte Carlo estimates the bound is the Wilson score bound over the draws ({@link WilsonBound}); the
     * Wald bound {@code alpha - z * standardError} used before is alpha itself when every draw picks the
     * leader. For other estimates it stays {@code alpha - z * standardError}.
     */
    private static Evaluation posterior(ProbabilityBest best, StoppingConfig config) {
        int leader = argmax(best);
        double lower = best.method() == ProbabilityBest.Method.MONTE_CARLO && best.draws() > 0
                ? WilsonBound.lower(best.alpha(leader), best.draws(), config.z())
                : best.alpha(leader) - config.z() * best.standardError(leader);
        double threshold = 1 - config.delta();
        return new Evaluation(leader, lower, threshold, lower >= threshold);
    }

    /** Indifference rule: fires when {@code P(theta_leader >= max_j theta_j - epsilon) >= 1 - delta}. */
    private static Evaluation indifference(ProbabilityBest best, StoppingConfig config,
                                           LeaderConfidence confidence) {
        int leader = argmax(best);
        double p = confidence.probabilityWithin(leader, config.epsilon());
        Checks.inClosedRange("probability that the leader is within epsilon of the best", p, 0, 1);
        double threshold = 1 - config.delta();
        return new Evaluation(leader, p, threshold, p >= threshold);
    }

    private static GuardState guards(List<Arm> arms, Timing timing, StoppingConfig config) {
        long fewest = Long.MAX_VALUE;
        long total = 0;
        for (Arm arm : arms) {
            fewest = Math.min(fewest, arm.stats().trials());
            total = Math.addExact(total, arm.stats().trials());
        }
        return new GuardState(fewest, config.minTrialsPerArm(), timing.elapsed(), config.minDuration(), total,
                config.budgetTrials(), timing.now(), config.deadline());
    }

    /** Arm with the largest alpha, lowest index on ties. */
    private static int argmax(ProbabilityBest best) {
        int leader = 0;
        for (int i = 1; i < best.size(); i++) {
            if (best.alpha(i) > best.alpha(leader)) {
                leader = i;
            }
        }
        return leader;
    }

    private static void checkAlpha(List<Arm> arms, ProbabilityBest best) {
        Glr.metricOf(arms);
        Objects.requireNonNull(best, "best");
        if (best.size() != arms.size()) {
            throw new IllegalArgumentException("probability of being best has " + best.size()
                    + " entries but there are " + arms.size() + " arms");
        }
        for (int i = 0; i < arms.size(); i++) {
            Checks.inClosedRange("alpha of arm '" + arms.get(i).name() + "'", best.alpha(i), 0, 1);
            Checks.nonNegative("standard error of alpha of arm '" + arms.get(i).name() + "'",
                    best.standardError(i));
        }
    }

    /** One rule's verdict before the guards. */
    private record Evaluation(int leader, double statistic, double threshold, boolean fired) {
    }
}
