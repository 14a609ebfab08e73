package dev.runoff.engine.stopping;

import java.time.Duration;
import java.time.Instant;
import java.util.Objects;

/**
 * When the experiment started and the time of this evaluation (stream time, or an injected clock's
 * reading). Nothing in the engine reads a clock itself.
 *
 * @param start when the experiment started
 * @param now   the evaluation time, not before {@code start}
 */
public record Timing(Instant start, Instant now) {

    /** Validates that {@code now} is not before {@code start}. */
    public Timing {
        Objects.requireNonNull(start, "start");
        Objects.requireNonNull(now, "now");
        if (now.isBefore(start)) {
            throw new IllegalArgumentException("now (" + now + ") must not be before start (" + start + ")");
        }
    }

    /** Time elapsed since the start. */
    public Duration elapsed() {
        return Duration.between(start, now);
    }
}
