package dev.runoff.records;

import dev.runoff.engine.core.Metric;
import dev.runoff.engine.posterior.BetaPrior;
import dev.runoff.engine.posterior.NormalGammaPrior;
import dev.runoff.engine.posterior.Prior;
import dev.runoff.records.avro.BetaParams;
import dev.runoff.records.avro.CountingMode;
import dev.runoff.records.avro.ExperimentDefinition;
import dev.runoff.records.avro.MetricKind;
import dev.runoff.records.avro.NormalGammaPriorSpec;

/** Validation, versioning and engine views of {@link ExperimentDefinition}. */
public final class Definitions {

    private static final RecordCodec<ExperimentDefinition> CODEC = RecordCodec.definitions();
    private static final String VERSION_FIELD = "version";
    private static final org.apache.avro.message.BinaryMessageDecoder<ExperimentDefinition> INTERNAL_DECODER =
            internalDecoder();

    /** Early-outcome grace of a definition that leaves {@code earlyOutcomeGraceMs} unset. */
    public static final long DEFAULT_EARLY_OUTCOME_GRACE_MS = 60_000L;

    /**
     * Shortest accepted {@code recomputePeriodMs}: one evaluation per second per experiment at most. An
     * evaluation costs up to a few milliseconds (see performance.md) and writes one decision record.
     */
    public static final long MIN_RECOMPUTE_PERIOD_MS = 1_000L;

    /**
     * Shortest accepted {@code heartbeatMs}. A running experiment is evaluated (and writes a decision record)
     * at each heartbeat even without new data, so this bounds the decision records of an idle experiment at
     * 8,640 a day; the decisions topic keeps them for ever.
     */
    public static final long MIN_HEARTBEAT_MS = 10_000L;

    /**
     * Smallest accepted shape of a Beta prior ({@code metric.prior.a} and {@code .b}). Exact P(best) integrates
     * Beta densities with shapes down to 0.03 at both singular ends; below that the part of the mass that lies
     * under the smallest double is lost (measured on main: 5e-9 at shape 0.02, 4e-6 at 0.01; see
     * src/docs/planning-and-stopping.md). A posterior shape is the prior shape plus a count, so this floor
     * keeps every posterior shape at or above it too.
     */
    public static final double MIN_BETA_PRIOR_SHAPE = 0.03;

    private Definitions() {
    }

    /**
     * What is wrong with a Beta prior shape, or null when it is at least {@link #MIN_BETA_PRIOR_SHAPE} (NaN is
     * wrong): the one statement of the rule, shared by definitions and the {@code evaluate} command.
     */
    public static String betaPriorShapeProblem(double shape) {
        if (shape >= MIN_BETA_PRIOR_SHAPE) {
            return null;
        }
        return "must be >= " + MIN_BETA_PRIOR_SHAPE
                + " (smaller Beta shapes lose probability mass in the exact P(best) integration), got " + shape;
    }

    /**
     * Checks every field of {@code definition} with the default limits, the deadline against
     * {@code nowMillis}: the definition when valid, else the full list of problems, each naming its field.
     */
    public static Decoded<ExperimentDefinition> validate(ExperimentDefinition definition, long nowMillis) {
        return CODEC.validate(definition, nowMillis);
    }

    /**
     * True when the two definitions are equal in everything but {@code version} (compared through their
     * canonical JSON, so -0.0 equals 0.0).
     */
    public static boolean sameContent(ExperimentDefinition a, ExperimentDefinition b) {
        return CanonicalJson.without(a, VERSION_FIELD).equals(CanonicalJson.without(b, VERSION_FIELD));
    }

    /**
     * The version policy: the definition to store after {@code submitted} arrives while {@code current}
     * (null for a new experiment) is in force. Whatever version the author sent is ignored: a new experiment
     * gets version 1; a submission with the same content keeps the current definition and version; any
     * change gets the current version + 1. Call it with a submission {@link #validate} accepted.
     */
    public static ExperimentDefinition assignVersion(ExperimentDefinition current, ExperimentDefinition submitted) {
        if (current != null && sameContent(current, submitted)) {
            return current;
        }
        long version = current == null ? 1 : Math.addExact(current.getVersion(), 1);
        return ExperimentDefinition.newBuilder(submitted).setVersion(version).build();
    }

    /** How the definition counts trials: UNIT when {@code counting} is unset. */
    public static CountingMode counting(ExperimentDefinition definition) {
        return definition.getCounting() == null ? CountingMode.UNIT : definition.getCounting();
    }

    /**
     * Whether a trial of {@code definition} is a unit counted when its window closes: a BERNOULLI metric with
     * UNIT counting, or a VALUE_PER_UNIT metric (which accepts UNIT counting only).
     */
    public static boolean unitLevel(ExperimentDefinition definition) {
        MetricKind kind = definition.getMetric().getKind();
        return kind == MetricKind.VALUE_PER_UNIT
                || kind == MetricKind.BERNOULLI && counting(definition) == CountingMode.UNIT;
    }

    /**
     * The cap of a VALUE_PER_UNIT metric's per-unit sums ({@code metric.valueCap}), or NaN for every other
     * kind.
     */
    public static double valueCap(ExperimentDefinition definition) {
        Double cap = definition.getMetric().getValueCap();
        return definition.getMetric().getKind() == MetricKind.VALUE_PER_UNIT && cap != null ? cap : Double.NaN;
    }

    /** The definition's early-outcome grace in milliseconds; {@value #DEFAULT_EARLY_OUTCOME_GRACE_MS} when unset. */
    public static long earlyOutcomeGraceMs(ExperimentDefinition definition) {
        Long grace = definition.getEarlyOutcomeGraceMs();
        return grace == null ? DEFAULT_EARLY_OUTCOME_GRACE_MS : grace;
    }

    /**
     * A definition from Avro single-object bytes written with the current schema or any earlier one
     * ({@link WriterSchemas}), without the validation rules: for internal stores and topics whose entries
     * were validated when they entered, and which a job of an earlier version may have written.
     *
     * @throws java.io.UncheckedIOException when the bytes are not such a definition
     */
    public static ExperimentDefinition fromInternalBytes(byte[] bytes) {
        try {
            return INTERNAL_DECODER.decode(bytes);
        } catch (java.io.IOException e) {
            throw new java.io.UncheckedIOException("corrupt internal definition", e);
        }
    }

    private static org.apache.avro.message.BinaryMessageDecoder<ExperimentDefinition> internalDecoder() {
        org.apache.avro.message.SchemaStore.Cache store = new org.apache.avro.message.SchemaStore.Cache();
        WriterSchemas.previous("ExperimentDefinition").forEach(store::addSchema);
        return ExperimentDefinition.createDecoder(store);
    }

    /** The definition's guardrails, in order; empty when it has none. */
    public static java.util.List<dev.runoff.records.avro.GuardrailSpec> guardrails(ExperimentDefinition definition) {
        return definition.getGuardrails() == null ? java.util.List.of() : definition.getGuardrails();
    }

    /**
     * The engine's metric kind of {@code definition}: VALUE_PER_UNIT is a VALUE metric for the engine (its
     * observations are per-unit sums).
     */
    public static Metric metric(ExperimentDefinition definition) {
        return definition.getMetric().getKind() == MetricKind.BERNOULLI ? Metric.BERNOULLI : Metric.VALUE;
    }

    /**
     * The engine prior of every arm: the definition's, or the documented default when it has none
     * ({@link BetaPrior#UNIFORM} for BERNOULLI, {@link NormalGammaPrior#WEAK} for VALUE).
     *
     * @throws IllegalArgumentException when the prior does not fit the metric kind or has invalid parameters
     *                                  (never for a definition {@link #validate} accepted)
     */
    public static Prior prior(ExperimentDefinition definition) {
        Object prior = definition.getMetric().getPrior();
        Metric metric = metric(definition);
        if (prior == null) {
            return metric == Metric.BERNOULLI ? BetaPrior.UNIFORM : NormalGammaPrior.WEAK;
        }
        Prior result = prior instanceof BetaParams b ? new BetaPrior(b.getA(), b.getB()) : normalGamma(prior);
        if ((result instanceof BetaPrior) != (metric == Metric.BERNOULLI)) {
            throw new IllegalArgumentException("metric.prior: " + result + " does not fit metric.kind " + metric);
        }
        return result;
    }

    private static Prior normalGamma(Object prior) {
        NormalGammaPriorSpec p = (NormalGammaPriorSpec) prior;
        return new NormalGammaPrior(p.getMu0(), p.getKappa0(), p.getAlpha0(), p.getBeta0());
    }
}
