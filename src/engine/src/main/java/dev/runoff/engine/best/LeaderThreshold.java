package dev.runoff.engine.best;

import dev.runoff.engine.core.Checks;
import dev.runoff.engine.core.WilsonBound;

/**
 * A stopping threshold on the leader's Monte Carlo alpha: the rule fires when the lower end of the Wilson score
 * interval at {@code z} of the leader's share of the draws reaches {@code level} (the posterior rule, with
 * {@code level = 1 - delta}).
 *
 * @param level the threshold, in (0, 1]
 * @param z     the normal quantile of the interval, {@code >= 0}
 */
public record LeaderThreshold(double level, double z) {

    /** Validates both; messages name the field and value. */
    public LeaderThreshold {
        Checks.inClosedRange("leader threshold level", level, 0, 1);
        if (level == 0) {
            throw new IllegalArgumentException("leader threshold level must be > 0, got 0.0");
        }
        Checks.nonNegative("leader threshold z", z);
    }

    /**
     * Whether more draws would hardly change the rule's verdict on a leader that won {@code share} of
     * {@code draws} draws: the rule fires already (a lower bound at z standard errors that clears the level
     * tends to rise as draws are added), or the upper end of the same interval lies below the level (the
     * leader's alpha is then below the level with the confidence of z, and the lower bound, at most the share,
     * would stay below it however many draws were made).
     */
    public boolean decided(double share, int draws) {
        return WilsonBound.lower(share, draws, z) >= level || WilsonBound.upper(share, draws, z) < level;
    }
}
