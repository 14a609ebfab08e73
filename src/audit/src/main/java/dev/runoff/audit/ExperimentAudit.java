package dev.runoff.audit;

import java.util.List;
import java.util.Optional;

/**
 * What {@code audit verify} found for one experiment.
 *
 * @param experimentId the experiment, or {@code null} for records whose experiment could not be read
 * @param records      records checked
 * @param reproduced   records the engine reproduced bit for bit
 * @param findings     every failed check, in record order
 * @param periods      the sample-ratio periods, tested or skipped
 * @param notes        what could not be checked, and why
 */
public record ExperimentAudit(String experimentId, int records, int reproduced, List<Finding> findings,
                              List<SampleRatio.Period> periods, List<String> notes) {

    /** Copies the lists. */
    public ExperimentAudit {
        findings = List.copyOf(findings);
        periods = List.copyOf(periods);
        notes = List.copyOf(notes);
    }

    /** Whether every check passed. */
    public boolean passed() {
        return findings.isEmpty();
    }

    /** The first failure in record order, if any. */
    public Optional<Finding> firstFailure() {
        return findings.stream().findFirst();
    }

    /** Periods with the given outcome. */
    public long count(SampleRatio.Outcome outcome) {
        return periods.stream().filter(p -> p.outcome() == outcome).count();
    }
}
