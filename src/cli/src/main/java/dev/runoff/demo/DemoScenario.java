package dev.runoff.demo;

import dev.runoff.records.Definitions;

import dev.runoff.records.avro.AfterStopPolicy;
import dev.runoff.records.avro.AllocationRule;
import dev.runoff.records.avro.AllocationSpec;
import dev.runoff.records.avro.EventType;
import dev.runoff.records.avro.ExperimentDefinition;
import dev.runoff.records.avro.GuardrailDirection;
import dev.runoff.records.avro.GuardrailSpec;
import dev.runoff.records.avro.MetricKind;
import dev.runoff.records.avro.MetricSpec;
import dev.runoff.records.avro.StoppingRule;
import dev.runoff.records.avro.StoppingSpec;
import java.util.List;

/**
 * The demo's invented scenario: a ferry operator's booking page tests fare-table layouts. Each visitor sees
 * one layout (an EXPOSURE) and books a crossing (a CONVERSION) with the layout's true booking rate, which
 * only the traffic generator knows, after a delay; a third of the visits are by visitors who came before. The arms are listed so that any prefix of them contains the best one,
 * with a clear gap, so a shortened demo still has a winner to find.
 */
public final class DemoScenario {

    /** The demo experiment's id. */
    public static final String EXPERIMENT_ID = "ferry-fare-tables";
    /**
     * Conversion window of the demo's definition: short, so that units are counted (their windows close) a
     * few seconds after their exposure and the demo still ends in about a minute, yet long against the job's
     * lag on a busy machine: the job closes a unit's window on its wall clock, so a booking it reads after that
     * (behind a backlog) is rejected as {@code late-outcome} even when it was stamped inside the window.
     */
    public static final long CONVERSION_WINDOW_MS = 4_000L;
    /** Share of visits by visitors who came before. */
    public static final double RETURNING_SHARE = 1.0 / 3;
    /**
     * Mean delay from a visit to its booking (exponential): about one booking in twelve (e^-2.5) arrives after
     * the {@link #CONVERSION_WINDOW_MS} window and counts for nothing.
     */
    public static final double BOOKING_DELAY_MEAN_MS = 1_600.0;

    /** Layout names, in definition order. */
    static final List<String> LAYOUTS = List.of("classic-grid", "flexible-bundle", "compact-list",
            "price-calendar", "cheapest-first");
    /** Hidden true booking rate of each layout, same order. */
    static final double[] RATES = {0.030, 0.050, 0.041, 0.034, 0.036};
    /**
     * Hidden share of each layout's new visitors whose payment fails (the guardrail's signal), same order:
     * compact-list books more than the classic grid but fails three times as many payments, past the
     * guardrail's margin of 50%.
     */
    static final double[] FAILED_PAYMENT_RATES = {0.015, 0.015, 0.045, 0.015, 0.015};
    /** The guardrail's name. */
    public static final String GUARDRAIL = "failed-payments";
    /** The signal its events carry. */
    public static final String SIGNAL = "payment-failed";
    /** Mean delay from a visit to its failed payment (exponential), well within the conversion window. */
    public static final double FAILURE_DELAY_MEAN_MS = 400.0;
    /** Most arms the scenario has. */
    public static final int MAX_ARMS = LAYOUTS.size();

    private final int arms;

    /**
     * The scenario with the first {@code arms} layouts.
     *
     * @throws IllegalArgumentException unless 2 <= arms <= {@link #MAX_ARMS}
     */
    public DemoScenario(int arms) {
        if (arms < 2 || arms > MAX_ARMS) {
            throw new IllegalArgumentException("arms must be in [2, " + MAX_ARMS + "], got " + arms);
        }
        this.arms = arms;
    }

    /** The layout names in play. */
    public List<String> layouts() {
        return LAYOUTS.subList(0, arms);
    }

    /** The hidden booking rates of the layouts in play. */
    public double[] rates() {
        double[] r = new double[arms];
        System.arraycopy(RATES, 0, r, 0, arms);
        return r;
    }

    /**
     * The rates the job can see: a booking counts only within the conversion window, so each layout's
     * counted rate is its booking rate times P(delay <= window) = 1 - exp(-window / mean delay).
     */
    public double[] countedRates() {
        double inWindow = 1 - Math.exp(-CONVERSION_WINDOW_MS / BOOKING_DELAY_MEAN_MS);
        double[] r = rates();
        for (int i = 0; i < r.length; i++) {
            r[i] *= inWindow;
        }
        return r;
    }

    /** The hidden failed-payment shares of the layouts in play. */
    public double[] failedPaymentRates() {
        double[] r = new double[arms];
        System.arraycopy(FAILED_PAYMENT_RATES, 0, r, 0, arms);
        return r;
    }

    /** The layout with the highest hidden rate. */
    public String trueBest() {
        double[] r = rates();
        int best = 0;
        for (int i = 1; i < r.length; i++) {
            if (r[i] > r[best]) {
                best = i;
            }
        }
        return layouts().get(best);
    }

    /**
     * The definition the demo registers: bookings per visitor, counted once the visitor's conversion window
     * of {@link #CONVERSION_WINDOW_MS} has closed (Beta(1, 1) prior), top-two Thompson
     * sampling with beta 1/2 after a warm-up, the GLR stopping rule at {@code delta}, a trial budget, and the
     * failed-payments guardrail: no layout may fail more than 1.5 times the payments of the layout most likely
     * best (there is no control), at alpha 0.05.
     *
     * @param recomputeMs how often the job recomputes the weights
     * @param budget      trial budget (the experiment stops with reason budget when reached)
     * @param delta       error probability of the stopping rule
     * @param warmUp      trials per arm before the weights leave uniform, also the minimum before a STOP
     */
    public ExperimentDefinition definition(long recomputeMs, long budget, double delta, long warmUp) {
        return ExperimentDefinition.newBuilder()
                .setExperimentId(EXPERIMENT_ID)
                .setArms(layouts())
                .setMetric(MetricSpec.newBuilder().setKind(MetricKind.BERNOULLI).setTrialEvent(EventType.EXPOSURE)
                        .setSuccessEvent(EventType.CONVERSION).build())
                .setAllocation(AllocationSpec.newBuilder().setRule(AllocationRule.TOP_TWO_THOMPSON).setBeta(0.5)
                        .setWarmUpTrials(warmUp).build())
                .setStopping(StoppingSpec.newBuilder().setRule(StoppingRule.GLR).setDelta(delta)
                        .setMinTrialsPerArm(warmUp).setBudgetTrials(budget).build())
                .setAfterStop(AfterStopPolicy.ALL_TO_WINNER)
                .setRecomputePeriodMs(recomputeMs)
                .setHeartbeatMs(Math.max(recomputeMs * 10, Definitions.MIN_HEARTBEAT_MS))
                .setAttributionWindowMs(CONVERSION_WINDOW_MS)
                .setValidForMs(recomputeMs * 60)
                .setGuardrails(List.of(new GuardrailSpec(GUARDRAIL, SIGNAL, GuardrailDirection.HIGHER_IS_WORSE, 0.5,
                        0.05, null)))
                .build();
    }
}
