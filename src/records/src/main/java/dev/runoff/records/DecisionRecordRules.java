package dev.runoff.records;

import dev.runoff.records.avro.ArmState;
import dev.runoff.records.avro.BetaParams;
import dev.runoff.records.avro.Decision;
import dev.runoff.records.avro.DecisionRecord;
import dev.runoff.records.avro.EstimationMethod;
import dev.runoff.records.avro.ExperimentDefinition;
import dev.runoff.records.avro.Guard;
import dev.runoff.records.avro.MetricKind;
import dev.runoff.records.avro.StoppingSpec;
import dev.runoff.records.avro.StudentTParams;
import java.util.EnumSet;
import java.util.List;
import java.util.Objects;
import java.util.Set;

/**
 * Rules of {@link DecisionRecord}: a valid embedded definition that agrees with the record, per-arm numbers
 * of the definition's metric kind, proper weight vectors, a decision consistent with its winner, a sealed
 * hash that matches the content.
 */
final class DecisionRecordRules implements RecordRules<DecisionRecord> {

    private final DefinitionRules definitionRules = new DefinitionRules();

    @Override
    public void check(DecisionRecord record, Limits limits, Problems problems) {
        AllocationUpdateRules.checkNumbering(record.getExperimentId(), record.getDefinitionVersion(),
                record.getSequence(), problems);
        problems.atLeast("streamTime", record.getStreamTime(), 0);
        checkStartedAt(record.getStartedAt(), record.getStreamTime(), problems);
        ExperimentDefinition def = record.getDefinition();
        definitionRules.check(def, limits, problems.under("definition"));
        checkAgreement(record, def, problems);
        checkArms(record.getArms(), def, problems);
        problems.closed("allocationBeta", record.getAllocationBeta(), 0, 1);
        List<Guard> guards = record.getGuards();
        Set<Guard> distinct = EnumSet.noneOf(Guard.class);
        distinct.addAll(guards);
        if (distinct.size() != guards.size()) {
            problems.add("guards", Reason.DUPLICATE, "each guard may appear once, got " + guards);
        }
        AllocationUpdateRules.checkWinner(record.getDecision() == Decision.STOP, record.getWinner(),
                Names.of(record.getArms(), ArmState::getArm), problems);
        AllocationUpdateRules.checkSignatureFields(record.getKeyId(), record.getSignature(), problems);
        problems.notBlank("reason", record.getReason());
        if ((record.getStatistic() == null) != (record.getThreshold() == null)) {
            problems.add("threshold", Reason.INCONSISTENT, "statistic and threshold must both be set or both null");
        }
        checkDraws(record, problems);
        problems.notBlank("engineVersion", record.getEngineVersion());
        checkHashes(record, problems);
    }

    /** A recorded start lies in [0, streamTime]; null (records from before the field existed) is allowed. */
    private static void checkStartedAt(Long startedAt, long streamTime, Problems problems) {
        if (startedAt != null && (startedAt < 0 || startedAt > streamTime)) {
            problems.add("startedAt", Reason.OUT_OF_RANGE, "must be in [0, streamTime = " + streamTime + "], got "
                    + startedAt);
        }
    }

    /** Fields copied from the definition must equal it, so the record cannot contradict what it embeds. */
    private static void checkAgreement(DecisionRecord record, ExperimentDefinition def, Problems problems) {
        requireEqual("experimentId", record.getExperimentId(), "definition.experimentId", def.getExperimentId(),
                problems);
        requireEqual("definitionVersion", record.getDefinitionVersion(), "definition.version", def.getVersion(),
                problems);
        requireEqual("allocationRule", record.getAllocationRule(), "definition.allocation.rule",
                def.getAllocation().getRule(), problems);
        StoppingSpec stopping = def.getStopping();
        requireEqual("stoppingRule", record.getStoppingRule(), "definition.stopping.rule", stopping.getRule(),
                problems);
        requireEqual("delta", record.getDelta(), "definition.stopping.delta", stopping.getDelta(), problems);
        requireEqual("epsilon", record.getEpsilon(), "definition.stopping.epsilon", stopping.getEpsilon(), problems);
    }

    private static void requireEqual(String field, Object value, String source, Object expected, Problems problems) {
        if (!Objects.equals(value, expected)) {
            problems.add(field, Reason.INCONSISTENT, value + " differs from " + source + " (" + expected + ")");
        }
    }

    private static void checkArms(List<ArmState> states, ExperimentDefinition def, Problems problems) {
        List<String> defined = def.getArms();
        List<String> names = Names.of(states, ArmState::getArm);
        if (!names.equals(defined)) {
            problems.add("arms", Reason.INCONSISTENT, "arm names " + names + " differ from the definition's "
                    + defined + " (same names, same order required)");
        }
        boolean bernoulli = def.getMetric().getKind() == MetricKind.BERNOULLI;
        double before = 0;
        double after = 0;
        for (int i = 0; i < states.size(); i++) {
            ArmState state = states.get(i);
            Problems arm = problems.under("arms", i);
            arm.atLeast("trials", state.getTrials(), 0);
            if (bernoulli) {
                checkBernoulli(state, arm);
            } else {
                checkValue(state, arm);
            }
            arm.closed("alpha", state.getAlpha(), 0, 1);
            if (!(state.getAlphaStandardError() >= 0)) {
                arm.add("alphaStandardError", Reason.OUT_OF_RANGE, "must be >= 0, got " + state.getAlphaStandardError());
            }
            arm.closed("weightBeforeGuards", state.getWeightBeforeGuards(), 0, 1);
            arm.closed("weight", state.getWeight(), 0, 1);
            GuardrailRules.checkStates(state, def, arm);
            before += state.getWeightBeforeGuards();
            after += state.getWeight();
        }
        problems.sumsToOne("arms.weightBeforeGuards", before);
        problems.sumsToOne("arms.weight", after);
    }

    private static void checkBernoulli(ArmState state, Problems arm) {
        Long successes = state.getSuccesses();
        if (arm.present("successes", successes) && (successes < 0 || successes > state.getTrials())) {
            arm.add("successes", Reason.OUT_OF_RANGE, "must be in [0, trials = " + state.getTrials() + "], got "
                    + successes);
        }
        requireNull("mean", state.getMean(), arm);
        requireNull("m2", state.getM2(), arm);
        if (state.getPosterior() instanceof BetaParams beta) {
            arm.positive("posterior.a", beta.getA());
            arm.positive("posterior.b", beta.getB());
        } else {
            arm.add("posterior", Reason.INCONSISTENT, "BERNOULLI metrics need a Beta posterior (a, b)");
        }
    }

    private static void checkValue(ArmState state, Problems arm) {
        requireNull("successes", state.getSuccesses(), arm);
        arm.present("mean", state.getMean());
        if (arm.present("m2", state.getM2()) && !(state.getM2() >= 0)) {
            arm.add("m2", Reason.OUT_OF_RANGE, "must be >= 0, got " + state.getM2());
        }
        if (state.getPosterior() instanceof StudentTParams t) {
            arm.positive("posterior.scale", t.getScale());
            arm.positive("posterior.degreesOfFreedom", t.getDegreesOfFreedom());
        } else {
            arm.add("posterior", Reason.INCONSISTENT,
                    "VALUE metrics need a Student-t posterior (location, scale, degreesOfFreedom)");
        }
    }

    private static void requireNull(String field, Object value, Problems problems) {
        if (value != null) {
            problems.add(field, Reason.INCONSISTENT, "must be null for this metric kind, got " + value);
        }
    }

    private static void checkDraws(DecisionRecord record, Problems problems) {
        boolean monteCarlo = record.getMethod() == EstimationMethod.MONTE_CARLO;
        int draws = record.getDraws();
        if (monteCarlo ? draws <= 0 : draws != 0) {
            problems.add("draws", Reason.INCONSISTENT, "must be " + (monteCarlo ? "> 0" : "0") + " for method "
                    + record.getMethod() + ", got " + draws);
        }
    }

    /** The content hash is checked last, and only when nothing else is wrong (canonical JSON needs it). */
    private static void checkHashes(DecisionRecord record, Problems problems) {
        String previous = record.getPreviousHash();
        if (!HashChain.isHash(previous)) {
            problems.add("previousHash", Reason.INVALID_TEXT, "must be 64 lowercase hex digits, got "
                    + Problems.quote(previous));
        } else if (record.getSequence() == 1 && !previous.equals(HashChain.GENESIS)) {
            problems.add("previousHash", Reason.INCONSISTENT, "must be 64 zeros for sequence 1");
        }
        String hash = record.getHash();
        if (!HashChain.isHash(hash)) {
            problems.add("hash", Reason.INVALID_TEXT, "must be 64 lowercase hex digits (is the record sealed?), got "
                    + Problems.quote(hash));
            return;
        }
        if (problems.isEmpty()) {
            String expected = HashChain.hashOf(record);
            if (!hash.equals(expected)) {
                problems.add("hash", Reason.INCONSISTENT, "does not match the record's content (expected "
                        + expected + ")");
            }
        }
    }
}
