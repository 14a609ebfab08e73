package dev.runoff.engine.core;

import dev.runoff.engine.stats.ArmStats;
import java.util.Objects;

/**
 * A named arm with its sufficient statistics.
 *
 * @param name  the arm's name, unique within an experiment, not blank
 * @param stats its statistics
 */
public record Arm(String name, ArmStats stats) {

    /** Validates the name and the statistics; messages name the arm. */
    public Arm {
        Objects.requireNonNull(name, "arm name");
        if (name.isBlank()) {
            throw new IllegalArgumentException("arm name must not be blank");
        }
        Objects.requireNonNull(stats, () -> "arm '" + name + "': statistics");
        stats.validate(name);
    }
}
