package dev.runoff.bench;

import dev.runoff.engine.stats.BernoulliStats;
import dev.runoff.records.Format;
import dev.runoff.records.HashChain;
import dev.runoff.records.RecordCodec;
import dev.runoff.records.avro.AllocationSpec;
import dev.runoff.records.avro.AllocationUpdate;
import dev.runoff.records.avro.BestArmEstimator;
import dev.runoff.records.avro.DecisionRecord;
import dev.runoff.records.avro.EventType;
import dev.runoff.records.avro.ExperimentDefinition;
import dev.runoff.records.avro.MetricKind;
import dev.runoff.records.avro.MetricSpec;
import dev.runoff.records.avro.StoppingRule;
import dev.runoff.records.avro.StoppingSpec;
import dev.runoff.decision.Evaluator;
import dev.runoff.decision.ExperimentState;
import dev.runoff.engine.EngineVersion;
import dev.runoff.topology.TopologySettings;
import java.security.MessageDigest;
import java.security.NoSuchAlgorithmException;
import java.util.Arrays;
import java.util.HexFormat;
import java.util.List;
import java.util.SplittableRandom;
import java.util.concurrent.TimeUnit;
import java.util.stream.IntStream;
import org.openjdk.jmh.annotations.Benchmark;
import org.openjdk.jmh.annotations.BenchmarkMode;
import org.openjdk.jmh.annotations.Fork;
import org.openjdk.jmh.annotations.Level;
import org.openjdk.jmh.annotations.Measurement;
import org.openjdk.jmh.annotations.Mode;
import org.openjdk.jmh.annotations.OutputTimeUnit;
import org.openjdk.jmh.annotations.Param;
import org.openjdk.jmh.annotations.Scope;
import org.openjdk.jmh.annotations.Setup;
import org.openjdk.jmh.annotations.State;
import org.openjdk.jmh.annotations.Warmup;

/**
 * Recomputation of many active experiments of 5 Bernoulli arms, as the allocation pass does it: the engine
 * (probability of being best by the estimator given as a parameter, top-two Thompson weights, guards), the
 * GLR stopping rule, the decision and control records, the hash-chain seal, and the encoding of both records
 * (Avro).
 *
 * <p>{@code recomputeOne} gives the average time of one experiment over a pool of distinct experiments;
 * {@code recomputeAll} times passes over the whole pool (single shots after two warm-up passes, so the JIT
 * has compiled the engine), i.e. the time to recompute {@code experiments} experiments on one thread.
 *
 * <p>Run: {@code mvn -B -q -o -pl src/bench -Pbench exec:exec -Dbench=RecomputeBench.recomputeOne
 * -Dbench.args="-f 1 -wi 2 -i 3"}; the full pass: {@code -Dbench=RecomputeBench.recomputeAll
 * -Dbench.args="-f 1"}.
 */
@State(Scope.Benchmark)
@Fork(1)
public class RecomputeBench {

    static final long NOW = 1_700_000_000_000L;

    /**
     * Number of distinct active experiments. The initial value is JMH's default, also for {@link SideBySide} and
     * {@link SameOutput}, which set fields only when told to.
     */
    @Param("10000")
    public int experiments = 10_000;

    /** The definitions' {@code bestArmEstimator}: SAMPLED (Monte Carlo, the default) or INTEGRATED (exact). */
    @Param({"SAMPLED", "INTEGRATED"})
    public String estimator = "SAMPLED";

    /** The engine version that recomputes: {@code current} ({@link EngineVersion#CURRENT}) or a label, e.g. 1.2. */
    @Param("current")
    public String engineVersion = "current";

    /** The definitions' stopping rule (GLR; POSTERIOR reads the leader's alpha). */
    @Param("GLR")
    public String stoppingRule = "GLR";

    /** The definitions' minimum trials per arm (the default keeps every experiment running). */
    @Param("1000000")
    public int minTrialsPerArm = 1_000_000;

    private ExperimentState[] states;
    private Evaluator evaluator;
    private final RecordCodec<DecisionRecord> decisions = RecordCodec.decisionRecords();
    private final RecordCodec<AllocationUpdate> updates = RecordCodec.allocationUpdates();
    private int next;
    private Evaluator.Result[] results;

    /** Builds the experiments: five arms with 2,000 to 20,000 trials and rates between 2% and 12% each. */
    @Setup(Level.Trial)
    public void setUp() {
        SplittableRandom random = new SplittableRandom(10_000);
        BestArmEstimator choice = BestArmEstimator.valueOf(estimator);
        StoppingSpec stopping = StoppingSpec.newBuilder().setRule(StoppingRule.valueOf(stoppingRule))
                .setMinTrialsPerArm(minTrialsPerArm).build();
        states = IntStream.range(0, experiments).mapToObj(i -> state("exp-" + i, random, choice, stopping))
                .toArray(ExperimentState[]::new);
        evaluator = new Evaluator(TopologySettings.MONTE_CARLO_DRAWS, version(engineVersion));
    }

    /** The engine version a setting names: {@code current} or a label. */
    static EngineVersion version(String setting) {
        return "current".equals(setting) ? EngineVersion.CURRENT : EngineVersion.of(setting);
    }

    /** The pool's experiments, in order (after {@link #setUp()}). */
    ExperimentState[] states() {
        return states.clone();
    }

    /** One experiment's recomputation. */
    @Benchmark
    @BenchmarkMode(Mode.AverageTime)
    @OutputTimeUnit(TimeUnit.MILLISECONDS)
    @Warmup(iterations = 2, time = 5)
    @Measurement(iterations = 3, time = 10)
    public int recomputeOne() {
        ExperimentState state = states[next];
        next = (next + 1) % states.length;
        return recompute(state);
    }

    /** A pass over every experiment of the pool. */
    @Benchmark
    @BenchmarkMode(Mode.SingleShotTime)
    @OutputTimeUnit(TimeUnit.SECONDS)
    @Warmup(iterations = 2)
    @Measurement(iterations = 3)
    public long recomputeAll() {
        long bytes = 0;
        for (ExperimentState state : states) {
            bytes += recompute(state);
        }
        return bytes;
    }

    /**
     * The records' share of a pass alone: each experiment's decision record sealed again (canonical JSON and
     * SHA-256) and both records checked and encoded, as {@link #recomputeAll} does after the evaluation; the
     * evaluations are made once, on the first call (a warm-up pass). Shows changes to record building,
     * sealing and encoding that the estimator's cost would hide in {@code recomputeAll}.
     */
    @Benchmark
    @BenchmarkMode(Mode.SingleShotTime)
    @OutputTimeUnit(TimeUnit.SECONDS)
    @Warmup(iterations = 2)
    @Measurement(iterations = 3)
    public long sealAndEncodeAll() {
        if (results == null) {
            results = Arrays.stream(states).map(state -> evaluator.evaluate(state, NOW))
                    .toArray(Evaluator.Result[]::new);
        }
        long bytes = 0;
        for (Evaluator.Result result : results) {
            DecisionRecord sealed = HashChain.seal(result.decision(), result.decision().getPreviousHash());
            bytes += decisions.encode(sealed, Format.AVRO).length + updates.encode(result.update(), Format.AVRO).length;
        }
        return bytes;
    }

    /**
     * SHA-256 over both encoded records of every experiment of the pool, in order: equal digests under two
     * class paths ({@link SameOutput}) show that a change kept every output bit.
     */
    public String digestAll() {
        MessageDigest sha = sha256();
        for (ExperimentState state : states) {
            Evaluator.Result result = evaluator.evaluate(state, NOW);
            sha.update(decisions.encode(result.decision(), Format.AVRO));
            sha.update(updates.encode(result.update(), Format.AVRO));
        }
        return HexFormat.of().formatHex(sha.digest());
    }

    private static MessageDigest sha256() {
        try {
            return MessageDigest.getInstance("SHA-256");
        } catch (NoSuchAlgorithmException e) {
            throw new IllegalStateException("the JDK must provide SHA-256", e);
        }
    }

    private int recompute(ExperimentState state) {
        Evaluator.Result result = evaluator.evaluate(state, NOW);
        return decisions.encode(result.decision(), Format.AVRO).length
                + updates.encode(result.update(), Format.AVRO).length;
    }

    private static ExperimentState state(String id, SplittableRandom random, BestArmEstimator estimator,
                                         StoppingSpec stopping) {
        List<String> arms = List.of("a", "b", "c", "d", "e");
        ExperimentDefinition def = ExperimentDefinition.newBuilder().setExperimentId(id).setVersion(1).setArms(arms)
                .setMetric(MetricSpec.newBuilder().setKind(MetricKind.BERNOULLI).setSuccessEvent(EventType.CLICK)
                        .build())
                .setAllocation(AllocationSpec.newBuilder().setBestArmEstimator(estimator).build())
                .setStopping(StoppingSpec.newBuilder(stopping).build())
                .build();
        ExperimentState state = ExperimentState.start(def);
        for (int arm = 0; arm < arms.size(); arm++) {
            long trials = 2_000 + random.nextInt(18_000);
            long successes = Math.round(trials * (0.02 + 0.1 * random.nextDouble()));
            state = state.withDelta(arm, new BernoulliStats(trials, successes), NOW - 60_000);
        }
        return state;
    }
}
