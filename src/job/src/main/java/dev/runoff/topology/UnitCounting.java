package dev.runoff.topology;

/**
 * The counting rule of one unit, free of Kafka so that {@link Attribution} and the bias simulation in the
 * tests run the same code.
 *
 * <p><b>Unit counting</b> (the default): a unit's first trial event makes it <i>pending</i> on its arm; a
 * success event stamped at most the conversion window after that exposure marks it converted (once); when
 * the window has closed (by the {@link #closeTime close time} below), {@link #close} counts the unit as one
 * trial, and as one success if it converted. Later exposures add nothing.
 *
 * <p>Design: under adaptive allocation the arms are fed at different times, so at any decision an arm fed
 * recently has more units whose conversions have not happened yet. Counting a unit only once its window
 * has closed gives every counted unit the same full chance to convert, whenever it was exposed: each
 * counted unit is an independent Bernoulli draw with the arm's conversion probability within the window,
 * so the Beta posterior sees unbiased trials (the selection into the count depends only on the exposure
 * time, which is independent of the outcome). Counting exposures at once and conversions when they arrive
 * (per-exposure counting), or counting converters at once and non-converters at window close, both make a
 * recently fed arm look worse (respectively better), and the allocation feeds on that bias. The price is
 * delay: a decision does not know the pending units, which the decision record reports per arm.
 *
 * <p><b>Value per unit</b> ({@code VALUE_PER_UNIT}): the same unit rule with a value in place of the
 * conversion: each value event stamped within the window adds its value to the unit's sum, and at window
 * close the unit enters its arm's value statistics as one observation, its sum winsorised into
 * [0, cap] (a unit without value events is a 0). Negative values (refunds) are added as they come, so they
 * net against the unit's purchases; a net negative sum counts as 0, the lower end of what the metric
 * measures (what a unit spent), so that one refund-heavy unit cannot drag its arm down by more than a unit
 * that bought nothing. Non-finite values never get here: event validation rejects them.
 *
 * <p>Design: per-unit sums of revenue are zero-inflated and heavy-tailed (most units spend nothing, a few
 * spend a lot), and a handful of extreme units dominate sample means and variances. Capping each unit's
 * contribution (winsorising at a fixed, pre-registered cap) bounds its variance, which the Normal-Gamma
 * posterior and the t-based stopping rules need to behave: the capped per-unit values are bounded and
 * independent across units, so their arm means are asymptotically Normal (central limit theorem), which is
 * what the Student-t marginals approximate. Capping (winsorising) per-user revenue to cut its variance is
 * common practice in online experiments (no source read for it here). A fixed cap in the definition, rather
 * than a percentile fitted to the data, keeps every observation a pure function of that unit's events, so
 * decisions replay exactly, and cannot be tuned after the results are seen.
 *
 * <p><b>Per-exposure counting</b> (the {@code EXPOSURE} option): every trial event is a trial at once and
 * every attributed success a success at once, never more successes than trials per unit.
 */
final class UnitCounting {

    private UnitCounting() {
    }

    /**
     * What a step adds to the unit's arm: trials, successes, the change of the arm's pending units, the
     * guardrail signals of a unit counted now, and (value per unit) the observation of a unit counted now
     * (NaN otherwise).
     */
    record Count(long trials, long successes, long pending, java.util.List<String> signals, double value,
                 java.util.Map<String, Double> signalObservations) {

        /** Nothing to add. */
        static final Count NONE = new Count(0, 0, 0);

        /** Copies the signals and their observations. */
        Count {
            signals = java.util.List.copyOf(signals);
            signalObservations = java.util.Map.copyOf(signalObservations);
        }

        /** A count without values of guardrail signals. */
        Count(long trials, long successes, long pending, java.util.List<String> signals, double value) {
            this(trials, successes, pending, signals, value, java.util.Map.of());
        }

        /** A count without a value. */
        Count(long trials, long successes, long pending, java.util.List<String> signals) {
            this(trials, successes, pending, signals, Double.NaN);
        }

        /** A count without signals. */
        Count(long trials, long successes, long pending) {
            this(trials, successes, pending, java.util.List.of());
        }

        boolean isEmpty() {
            return trials == 0 && successes == 0 && pending == 0;
        }
    }

    /** What became of an event. */
    enum Verdict {
        /** Taken into account (the count may still be empty). */
        TAKEN,
        /** A trial event on another arm than the unit's first. */
        ARM_CONFLICT,
        /** A success stamped outside the conversion window. */
        OUTSIDE_WINDOW,
        /** A success beyond what the unit may have (one per unit, or one per trial). */
        EXCESS,
        /** Unit counting: a success that arrived after the unit was counted (its window had closed). */
        LATE
    }

    /**
     * Result of a step.
     *
     * @param unit    the unit entry after the step (unchanged unless TAKEN)
     * @param count   what to add to the unit's arm
     * @param verdict what became of the event
     */
    record Step(UnitState unit, Count count, Verdict verdict) {
        static Step refused(UnitState unit, Verdict verdict) {
            return new Step(unit, Count.NONE, verdict);
        }
    }

    /**
     * A trial event of {@code arm} stamped {@code timestamp}, seen at wall-clock {@code now}.
     *
     * @param unit      the unit's entry, or {@code null} for its first trial event
     * @param version   the definition version in force
     * @param unitLevel whether the experiment counts units rather than exposures
     * @param windowMs  the experiment's conversion window
     */
    static Step expose(UnitState unit, String arm, long version, boolean unitLevel, long timestamp, long windowMs,
                       long now) {
        return expose(unit, arm, version, unitLevel, timestamp, windowMs, Double.NaN, now);
    }

    /**
     * {@link #expose(UnitState, String, long, boolean, long, long, long)} for a metric whose per-unit values
     * are capped at {@code valueCap} (value per unit; NaN for every other metric), kept from the first trial
     * event.
     */
    static Step expose(UnitState unit, String arm, long version, boolean unitLevel, long timestamp, long windowMs,
                       double valueCap, long now) {
        if (unit == null) {
            UnitState first = new UnitState(arm, version, unitLevel, timestamp, timestamp, 1, 0, windowMs, false, now,
                    java.util.List.of(), valueCap, 0);
            return new Step(first, unitLevel ? new Count(0, 0, 1) : new Count(1, 0, 0), Verdict.TAKEN);
        }
        if (!unit.arm().equals(arm)) {
            return Step.refused(unit, Verdict.ARM_CONFLICT);
        }
        UnitState next = new UnitState(unit.arm(), unit.version(), unit.unitLevel(), unit.firstTrialAt(),
                Math.max(unit.lastTrialAt(), timestamp), unit.trials() + 1, unit.successes(),
                unit.unitLevel() ? unit.windowMs() : windowMs, unit.counted(), now, unit.signals(), unit.valueCap(),
                unit.valueSum(), unit.signalValues());
        return new Step(next, unit.unitLevel() ? Count.NONE : new Count(1, 0, 0), Verdict.TAKEN);
    }

    /**
     * A success event stamped {@code timestamp}, seen at wall-clock {@code now}. Unit counting: the window runs
     * from the first exposure (a success stamped up to one window before it is allowed for clock skew between
     * producers). Per exposure: an arm-less success must lie within the window of the latest exposure, either
     * side.
     *
     * @param armNamed whether the event named the unit's arm
     */
    static Step convert(UnitState unit, long timestamp, boolean armNamed, long now) {
        if (unit.unitLevel()) {
            long gap = timestamp - unit.firstTrialAt();
            if (gap > unit.windowMs() || gap < -unit.windowMs()) {
                return Step.refused(unit, Verdict.OUTSIDE_WINDOW);
            }
            if (unit.successes() > 0) {
                return Step.refused(unit, Verdict.EXCESS);
            }
            if (unit.counted()) {
                return Step.refused(unit, Verdict.LATE);
            }
            return new Step(withSuccess(unit, now), Count.NONE, Verdict.TAKEN);
        }
        if (!armNamed && Math.abs(timestamp - unit.lastTrialAt()) > unit.windowMs()) {
            return Step.refused(unit, Verdict.OUTSIDE_WINDOW);
        }
        if (unit.successes() >= unit.trials()) {
            return Step.refused(unit, Verdict.EXCESS);
        }
        return new Step(withSuccess(unit, now), new Count(0, 1, 0), Verdict.TAKEN);
    }

    /**
     * A guardrail signal event stamped {@code timestamp}, seen at wall-clock {@code now} (unit counting, which
     * guardrails need): the unit gets the signal (a second one changes nothing) when the event lies within
     * the window of its first exposure (either side, as for successes) and the unit has not been counted yet.
     */
    static Step signal(UnitState unit, String signal, long timestamp, long now) {
        return signal(unit, signal, Double.NaN, Double.NaN, timestamp, now);
    }

    /**
     * {@link #signal(UnitState, String, long, long)} for a signal that value guardrails count with
     * {@code cap} (NaN when none does): the event's {@code value} is also added to the unit's sum of that
     * signal's values, any number of them, as a value event adds to a value-per-unit sum.
     */
    static Step signal(UnitState unit, String signal, double cap, double value, long timestamp, long now) {
        Verdict refusal = openWindowRefusal(unit, timestamp);
        if (refusal != null) {
            return Step.refused(unit, refusal);
        }
        UnitState marked = unit.withSignal(signal, now);
        return new Step(Double.isNaN(cap) ? marked : marked.withSignalValue(signal, cap, value, now), Count.NONE,
                Verdict.TAKEN);
    }

    /**
     * Value per unit: a value event stamped {@code timestamp} with {@code value}, seen at wall-clock
     * {@code now}. It is added to the unit's sum when it lies within the window of the first exposure (either
     * side, as for successes) and the unit has not been counted yet; any number of value events may add up.
     */
    static Step addValue(UnitState unit, double value, long timestamp, long now) {
        Verdict refusal = openWindowRefusal(unit, timestamp);
        return refusal != null ? Step.refused(unit, refusal)
                : new Step(unit.withValue(value, now), Count.NONE, Verdict.TAKEN);
    }

    /**
     * Why an outcome stamped {@code timestamp} cannot mark a counted-at-close unit: outside the window of its
     * first exposure (either side), or the unit already counted; {@code null} when it can.
     */
    private static Verdict openWindowRefusal(UnitState unit, long timestamp) {
        long gap = timestamp - unit.firstTrialAt();
        if (gap > unit.windowMs() || gap < -unit.windowMs()) {
            return Verdict.OUTSIDE_WINDOW;
        }
        return unit.counted() ? Verdict.LATE : null;
    }

    /**
     * The time up to which a task may treat conversion windows as closed: the earlier of its wall clock
     * {@code now} and its stream time (the largest record timestamp it has read), or the wall clock alone
     * once it has read nothing for {@code idleMs}.
     *
     * <p>Design: a window's end is an event time (first exposure's timestamp plus the window), so whether
     * every outcome stamped inside it has been read is a question about the input, not about the job's
     * clock. A task that lags behind its input has a wall clock far ahead of what it has read; closing by the
     * wall clock would count a unit a failure while its conversion, stamped inside the window, is still
     * waiting in the backlog (the late-conversion bias of matured counting, back through the job's lag).
     * Stream time is the watermark of what the task has read: with records stamped at the event's time and
     * read in order, a window whose end is at or below it has had all its outcomes read, however far behind
     * the task is, so the count no longer depends on the job's lag: the event-time/processing-time distinction
     * and watermarks of Akidau et al., "The Dataflow Model", VLDB 2015. The wall clock still bounds it, so
     * a producer stamping the future cannot close a window early. Stream time stops when the input goes
     * quiet; a task that has read nothing for {@code idleMs} is caught up, not behind, and then the wall
     * clock alone decides, as for a job without lag.
     *
     * @param now        the task's wall clock
     * @param streamTime the largest record timestamp the task has read (negative if none yet)
     * @param lastReadAt wall-clock time the task last read a record (or started)
     * @param idleMs     how long without a record makes the task idle
     */
    static long closeTime(long now, long streamTime, long lastReadAt, long idleMs) {
        if (now - lastReadAt >= idleMs) {
            return now;
        }
        return Math.min(now, streamTime);
    }

    /**
     * Unit counting: once the unit's window has closed by {@code closeTime} (see {@link #closeTime}), the unit
     * enters its arm's trials, as a success if it converted (value per unit: with its capped sum as the
     * observation); otherwise (window still open, already counted, per-exposure counting) nothing changes.
     *
     * @param now the wall clock, recorded as the entry's last update
     */
    static Step close(UnitState unit, long closeTime, long now) {
        if (!unit.unitLevel() || unit.counted() || closeTime < unit.closesAt()) {
            return new Step(unit, Count.NONE, Verdict.TAKEN);
        }
        double value = unit.valuePerUnit() ? unit.cappedValue() : Double.NaN;
        return new Step(unit.countedAt(now), new Count(1, unit.successes() > 0 ? 1 : 0, -1, unit.signals(), value,
                unit.signalObservations()), Verdict.TAKEN);
    }

    private static UnitState withSuccess(UnitState unit, long now) {
        return new UnitState(unit.arm(), unit.version(), unit.unitLevel(), unit.firstTrialAt(), unit.lastTrialAt(),
                unit.trials(), unit.successes() + 1, unit.windowMs(), unit.counted(), now, unit.signals(),
                unit.valueCap(), unit.valueSum(), unit.signalValues());
    }
}
