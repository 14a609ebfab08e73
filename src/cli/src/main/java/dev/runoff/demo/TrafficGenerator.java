package dev.runoff.demo;

import dev.runoff.records.avro.EventType;
import dev.runoff.records.avro.OutcomeEvent;
import java.util.ArrayList;
import java.util.List;
import org.apache.commons.rng.UniformRandomProvider;
import org.apache.commons.rng.simple.RandomSource;

/**
 * Synthetic visitors for the demo: each draws a layout from the published weights (as a serving tier
 * would, independently per visitor) and books with the layout's hidden rate. Seeded: the same seed and the
 * same sequence of weights give the same events.
 */
final class TrafficGenerator {

    private final String experimentId;
    private final List<String> arms;
    private final double[] rates;
    private final UniformRandomProvider rng;
    private final String runId;
    private long visitors;

    /**
     * @param experimentId experiment of the events
     * @param arms         arm names
     * @param rates        hidden success rate of each arm, in [0, 1]
     * @param seed         seed of the generator
     */
    TrafficGenerator(String experimentId, List<String> arms, double[] rates, long seed) {
        if (arms.size() != rates.length) {
            throw new IllegalArgumentException(arms.size() + " arms but " + rates.length + " rates");
        }
        this.experimentId = experimentId;
        this.arms = List.copyOf(arms);
        this.rates = rates.clone();
        this.rng = RandomSource.XO_RO_SHI_RO_128_PP.create(seed);
        this.runId = Long.toHexString(seed);
    }

    /** Visitors generated so far. */
    long visitors() {
        return visitors;
    }

    /**
     * The events of {@code count} new visitors at time {@code now}, drawn with {@code weights} (one per arm,
     * summing to 1): an EXPOSURE each, and a CONVERSION for those who book.
     */
    List<OutcomeEvent> next(int count, double[] weights, long now) {
        if (weights.length != arms.size()) {
            throw new IllegalArgumentException(weights.length + " weights for " + arms.size() + " arms");
        }
        List<OutcomeEvent> events = new ArrayList<>(count + count / 10);
        for (int i = 0; i < count; i++) {
            long n = ++visitors;
            int arm = draw(weights, rng.nextDouble());
            String unit = "visitor-" + n;
            events.add(event(unit, runId + "-" + n + "-x", EventType.EXPOSURE, now, arms.get(arm)));
            if (rng.nextDouble() < rates[arm]) {
                events.add(event(unit, runId + "-" + n + "-b", EventType.CONVERSION, now, null));
            }
        }
        return events;
    }

    /** The arm whose cumulative weight first exceeds {@code u} (inverse CDF); the last arm with weight left. */
    static int draw(double[] weights, double u) {
        double cumulative = 0;
        int last = -1;
        for (int i = 0; i < weights.length; i++) {
            if (weights[i] > 0) {
                cumulative += weights[i];
                last = i;
                if (u < cumulative) {
                    return i;
                }
            }
        }
        if (last < 0) {
            throw new IllegalArgumentException("weights must have a positive entry");
        }
        return last;
    }

    private OutcomeEvent event(String unit, String eventId, EventType type, long now, String arm) {
        return OutcomeEvent.newBuilder().setExperimentId(experimentId).setUnitId(unit).setEventId(eventId)
                .setType(type).setTimestamp(now).setArm(arm).build();
    }
}
