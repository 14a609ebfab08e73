package dev.runoff.job.pages;

import dev.runoff.records.avro.DecisionRecord;
import java.util.ArrayList;
import java.util.List;

/**
 * The decision records of one experiment as the pages show them: the latest record whole, and a bounded
 * series of chart points over the whole run. When the series reaches {@link #MAX_POINTS} every other point
 * is dropped (the first and the newest stay), so a long run keeps its whole span at a coarser step.
 * Records that arrive out of order or twice (a lower or equal sequence, as after a replayed transaction or a
 * re-created experiment) replace nothing older than the latest, except that a sequence of 1 starts the
 * series again.
 */
final class ExperimentHistory {

    /** Most chart points kept per experiment. */
    static final int MAX_POINTS = 240;

    private DecisionRecord latest;
    private List<DecisionPoint> points = new ArrayList<>();

    /** Adds {@code record}; returns false when it was older than the latest and ignored. */
    synchronized boolean add(DecisionRecord record) {
        if (latest != null && record.getSequence() <= latest.getSequence() && record.getSequence() != 1) {
            return false;
        }
        if (record.getSequence() == 1) {
            points = new ArrayList<>();
        }
        latest = record;
        if (points.size() >= MAX_POINTS) {
            thin();
        }
        points.add(DecisionPoint.of(record));
        return true;
    }

    private void thin() {
        List<DecisionPoint> kept = new ArrayList<>(MAX_POINTS / 2 + 1);
        for (int i = 0; i < points.size(); i += 2) {
            kept.add(points.get(i));
        }
        points = kept;
    }

    /** The latest record. */
    synchronized DecisionRecord latest() {
        return latest;
    }

    /** The chart points, oldest first. */
    synchronized List<DecisionPoint> points() {
        return List.copyOf(points);
    }
}
