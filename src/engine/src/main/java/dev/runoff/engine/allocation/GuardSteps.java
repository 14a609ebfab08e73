package dev.runoff.engine.allocation;

import java.util.EnumSet;
import java.util.List;
import java.util.Set;

/** The guard steps, in the order documented on {@link Guards}. */
final class GuardSteps {
    /** How far a weight vector may be from summing to 1 before it is rejected. */
    static final double SUM_TOLERANCE = 1e-9;

    private final Guards guards;
    private final int control;
    private final Set<GuardFlag> flags = EnumSet.noneOf(GuardFlag.class);

    private GuardSteps(Guards guards, List<String> arms) {
        this.guards = guards;
        this.control = guards.control() == null ? -1 : controlIndex(guards.control().arm(), arms);
    }

    static GuardedWeights apply(Guards guards, double[] ruleWeights, List<String> arms, long[] trials,
                                double[] previous) {
        int k = arms.size();
        guards.checkFeasible(k);
        checkDistribution("rule weights", ruleWeights, k);
        if (trials.length != k) {
            throw new IllegalArgumentException("trials must have " + k + " entries, got " + trials.length);
        }
        if (previous != null) {
            checkDistribution("previous weights", previous, k);
        }
        return new GuardSteps(guards, arms).run(ruleWeights, trials, previous);
    }

    private GuardedWeights run(double[] ruleWeights, long[] trials, double[] previous) {
        double[] w = ruleWeights.clone();
        if (inWarmUp(trials)) {
            flags.add(GuardFlag.WARM_UP);
            w = Weights.uniform(w.length);
        }
        w = controlAndFloor(w, true);
        if (previous != null && guards.maxChange() < 1) {
            w = cap(w, controlAndFloor(previous, false));
        }
        return new GuardedWeights(Weights.normalised(w), flags);
    }

    private boolean inWarmUp(long[] trials) {
        for (long t : trials) {
            if (t < guards.warmUpTrials()) {
                return true;
            }
        }
        return false;
    }

    private double[] controlAndFloor(double[] w, boolean report) {
        double[] out = w.clone();
        double budget = 1.0;
        if (control >= 0) {
            budget = 1.0 - guards.control().share();
            out = controlShare(out, guards.control().share());
            flag(report, GuardFlag.CONTROL_SHARE);
        }
        if (guards.floor() > 0 && raiseToFloor(out, budget)) {
            flag(report, GuardFlag.FLOOR);
        }
        return out;
    }

    private void flag(boolean report, GuardFlag flag) {
        if (report) {
            flags.add(flag);
        }
    }

    /** Control gets {@code share}; the others share the rest in proportion (equally if all are 0). */
    private double[] controlShare(double[] w, double share) {
        double others = 0;
        for (int i = 0; i < w.length; i++) {
            others += i == control ? 0 : w[i];
        }
        double[] out = new double[w.length];
        for (int i = 0; i < w.length; i++) {
            if (i == control) {
                out[i] = share;
            } else {
                out[i] = others > 0 ? (1 - share) * (w[i] / others) : (1 - share) / (w.length - 1);
            }
        }
        return out;
    }

    /**
     * Raises the non-control arms of {@code w} (which sum to {@code budget}) to the floor in place: arms
     * whose scaled weight falls below the floor are pinned to it, the rest are scaled by the common factor
     * {@code s} that keeps the budget. Pinning an arm lowers {@code s}, so the pinned set only grows and
     * the loop ends within {@code k} rounds. Returns whether any arm was pinned.
     */
    private boolean raiseToFloor(double[] w, double budget) {
        double f = guards.floor();
        boolean[] pinned = new boolean[w.length];
        int pinnedCount = 0;
        double scale = 1.0;
        boolean changed = true;
        while (changed) {
            double free = 0;
            for (int i = 0; i < w.length; i++) {
                free += i == control || pinned[i] ? 0 : w[i];
            }
            scale = free > 0 ? (budget - f * pinnedCount) / free : 0;
            changed = false;
            for (int i = 0; i < w.length; i++) {
                if (i != control && !pinned[i] && scale * w[i] < f) {
                    pinned[i] = true;
                    pinnedCount++;
                    changed = true;
                }
            }
        }
        for (int i = 0; i < w.length; i++) {
            if (i != control) {
                w[i] = pinned[i] ? f : scale * w[i];
            }
        }
        return pinnedCount > 0;
    }

    /**
     * The point {@code (1 - lambda) * previous + lambda * target} with the largest {@code lambda <= 1}
     * that keeps every weight within {@code maxChange} of {@code previous}.
     */
    private double[] cap(double[] target, double[] previous) {
        double largest = 0;
        for (int i = 0; i < target.length; i++) {
            largest = Math.max(largest, Math.abs(target[i] - previous[i]));
        }
        if (largest <= guards.maxChange()) {
            return target;
        }
        flags.add(GuardFlag.CAP);
        double lambda = guards.maxChange() / largest;
        double[] out = new double[target.length];
        for (int i = 0; i < target.length; i++) {
            out[i] = (1 - lambda) * previous[i] + lambda * target[i];
        }
        return out;
    }

    private static int controlIndex(String name, List<String> arms) {
        int i = arms.indexOf(name);
        if (i < 0) {
            throw new IllegalArgumentException("control arm '" + name + "' is not one of the arms " + arms);
        }
        return i;
    }

    /** Throws unless {@code w} has {@code k} finite non-negative entries summing to 1 within tolerance. */
    static void checkDistribution(String what, double[] w, int k) {
        if (w.length != k) {
            throw new IllegalArgumentException(what + " must have " + k + " entries, got " + w.length);
        }
        for (int i = 0; i < k; i++) {
            if (!(w[i] >= 0) || !Double.isFinite(w[i])) {
                throw new IllegalArgumentException(what + "[" + i + "] must be finite and >= 0, got " + w[i]);
            }
        }
        double sum = Weights.sum(w);
        if (Math.abs(sum - 1) > SUM_TOLERANCE) {
            throw new IllegalArgumentException(what + " must sum to 1 (within " + SUM_TOLERANCE + "), got " + sum);
        }
    }
}
