package dev.runoff.audit;

import dev.runoff.records.avro.ArmState;
import dev.runoff.records.avro.Decision;
import dev.runoff.records.avro.DecisionRecord;
import java.util.ArrayList;
import java.util.Collections;
import java.util.LinkedHashMap;
import java.util.LinkedHashSet;
import java.util.List;
import java.util.Map;
import java.util.Objects;
import java.util.Set;

/**
 * One experiment's decisions over time: per decision its sequence, stream time, trials, probability of being
 * best and weight per arm, and the decision. Arms are listed in the order they first appear; an arm absent from
 * a decision (a definition version without it) has no point there.
 *
 * @param experimentId the experiment
 * @param arms         every arm that appears, in order of first appearance
 * @param rows         one row per decision, in the order given
 */
public record Timeline(String experimentId, List<String> arms, List<Row> rows) {

    /** Copies the lists. */
    public Timeline {
        Objects.requireNonNull(experimentId, "experimentId");
        arms = List.copyOf(arms);
        rows = List.copyOf(rows);
    }

    /**
     * The timeline of {@code records}, which must all belong to {@code experimentId}.
     *
     * @throws IllegalArgumentException when there are no records or one belongs to another experiment
     */
    public static Timeline of(String experimentId, List<DecisionRecord> records) {
        if (records.isEmpty()) {
            throw new IllegalArgumentException("no decision records for experiment '" + experimentId + "'");
        }
        Set<String> arms = new LinkedHashSet<>();
        List<Row> rows = new ArrayList<>(records.size());
        for (DecisionRecord record : records) {
            if (!record.getExperimentId().equals(experimentId)) {
                throw new IllegalArgumentException("record sequence " + record.getSequence() + " belongs to experiment '"
                        + record.getExperimentId() + "', not '" + experimentId + "'");
            }
            rows.add(Row.of(record));
            record.getArms().forEach(a -> arms.add(a.getArm()));
        }
        return new Timeline(experimentId, new ArrayList<>(arms), rows);
    }

    /** The first STOP, if any. */
    public Row stop() {
        return rows.stream().filter(Row::isStop).findFirst().orElse(null);
    }

    /**
     * One decision.
     *
     * @param sequence          decision sequence number
     * @param streamTime        stream time of the decision, ms since the epoch
     * @param definitionVersion definition version in force
     * @param points            per arm present in the decision, in its order
     * @param decision          CONTINUE or STOP
     * @param winner            the winner of a STOP, else {@code null}
     * @param reason            the record's reason
     */
    public record Row(long sequence, long streamTime, long definitionVersion, Map<String, Point> points,
                      String decision, String winner, String reason) {

        /** Copies the map, keeping its order. */
        public Row {
            points = Collections.unmodifiableMap(new LinkedHashMap<>(points));
        }

        static Row of(DecisionRecord record) {
            Map<String, Point> points = new LinkedHashMap<>();
            for (ArmState arm : record.getArms()) {
                points.put(arm.getArm(), new Point(arm.getTrials(), arm.getSuccesses(), arm.getAlpha(),
                        arm.getWeight(), arm.getSuspendedBy()));
            }
            return new Row(record.getSequence(), record.getStreamTime(), record.getDefinitionVersion(), points,
                    record.getDecision().name(), record.getWinner(), record.getReason());
        }

        /** Whether this decision is a STOP. */
        public boolean isStop() {
            return Decision.STOP.name().equals(decision);
        }
    }

    /**
     * One arm at one decision.
     *
     * @param trials    trials so far
     * @param successes successes so far (BERNOULLI), or {@code null} (VALUE)
     * @param pBest     probability that the arm is best (the record's alpha)
     * @param weight    weight published (after the guards)
     * @param suspendedBy the guardrail that suspended the arm at this decision, or {@code null}
     */
    public record Point(long trials, Long successes, double pBest, double weight, String suspendedBy) {
    }
}
