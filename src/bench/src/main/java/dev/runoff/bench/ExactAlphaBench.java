package dev.runoff.bench;

import dev.runoff.engine.best.ExactProbabilityBest;
import dev.runoff.engine.best.ExpectedGain;
import dev.runoff.engine.best.FastExactProbabilityBest;
import dev.runoff.engine.best.ProbabilityBest;
import dev.runoff.engine.posterior.BetaPosterior;
import dev.runoff.engine.posterior.Posterior;
import dev.runoff.engine.posterior.StudentTPosterior;
import java.util.ArrayList;
import java.util.List;
import java.util.SplittableRandom;
import java.util.concurrent.TimeUnit;
import org.openjdk.jmh.annotations.Benchmark;
import org.openjdk.jmh.annotations.BenchmarkMode;
import org.openjdk.jmh.annotations.Fork;
import org.openjdk.jmh.annotations.Measurement;
import org.openjdk.jmh.annotations.Mode;
import org.openjdk.jmh.annotations.OutputTimeUnit;
import org.openjdk.jmh.annotations.Scope;
import org.openjdk.jmh.annotations.Setup;
import org.openjdk.jmh.annotations.State;
import org.openjdk.jmh.annotations.Warmup;

/**
 * One exact evaluation of alpha (and of the expected gains) for typical experiments. Target: 5 Beta arms
 * around 1,000 trials each under 0.5 ms per evaluation (median of the sampled times). Run with
 * {@code mvn -B -q -o -pl src/bench -Pbench exec:exec -Dbench=ExactAlphaBench -Dbench.args="-f 1 -wi 3 -i 5"}.
 * The methods ending in {@code Fast} use {@link FastExactProbabilityBest} (engine version 1.3), the others
 * {@link ExactProbabilityBest} (1.2); {@code SideBySide} compares a pair in one JVM
 * ({@code SideBySide ExactAlphaBench fiveBetaArms,fiveBetaArmsFast ...}).
 */
@BenchmarkMode(Mode.SampleTime)
@OutputTimeUnit(TimeUnit.MICROSECONDS)
@Warmup(iterations = 3, time = 1)
@Measurement(iterations = 5, time = 1)
@Fork(1)
@State(Scope.Benchmark)
public class ExactAlphaBench {
    private static final int POOL = 1_000;

    private final ExactProbabilityBest exact = new ExactProbabilityBest();
    private final FastExactProbabilityBest fast = new FastExactProbabilityBest();
    private List<Posterior> fiveBeta;
    private List<Posterior> twentyBeta;
    private List<Posterior> fiveStudentT;
    private List<List<Posterior>> pool;
    private int next;

    /** Builds the posteriors: rates near 10 %, 1,000 trials per arm, uniform prior. */
    @Setup
    public void setUp() {
        int[] successes = {100, 105, 110, 95, 120};
        fiveBeta = new ArrayList<>();
        for (int s : successes) {
            fiveBeta.add(new BetaPosterior(1 + s, 1 + 1000 - s));
        }
        twentyBeta = new ArrayList<>();
        for (int i = 0; i < 20; i++) {
            int s = 90 + (i * 7) % 31;
            twentyBeta.add(new BetaPosterior(1 + s, 1 + 1000 - s));
        }
        fiveStudentT = new ArrayList<>();
        for (int i = 0; i < 5; i++) {
            fiveStudentT.add(new StudentTPosterior(10 + 0.05 * i, 0.1, 1000));
        }
        pool = new ArrayList<>();
        SplittableRandom random = new SplittableRandom(10_000);
        for (int e = 0; e < POOL; e++) {
            List<Posterior> arms = new ArrayList<>();
            for (int arm = 0; arm < 5; arm++) {
                long trials = 2_000 + random.nextInt(18_000);
                long wins = Math.round(trials * (0.02 + 0.1 * random.nextDouble()));
                arms.add(new BetaPosterior(1 + wins, 1 + trials - wins));
            }
            pool.add(arms);
        }
    }

    /** The target case: 5 Beta arms, about 1,000 trials each. */
    @Benchmark
    public ProbabilityBest fiveBetaArms() {
        return exact.estimate(fiveBeta, 0);
    }

    /** The target case with engine version 1.3's estimator. */
    @Benchmark
    public ProbabilityBest fiveBetaArmsFast() {
        return fast.estimate(fiveBeta, 0);
    }

    /**
     * The next of 1,000 five-arm experiments drawn as in {@code RecomputeBench} (2,000 to 20,000 trials,
     * rates 2% to 12%, uniform prior), in turn.
     */
    @Benchmark
    public ProbabilityBest poolArms() {
        return exact.estimate(nextOfPool(), 0);
    }

    /** As {@link #poolArms} with engine version 1.3's estimator. */
    @Benchmark
    public ProbabilityBest poolArmsFast() {
        return fast.estimate(nextOfPool(), 0);
    }

    private List<Posterior> nextOfPool() {
        List<Posterior> arms = pool.get(next);
        next = (next + 1) % POOL;
        return arms;
    }

    /** 20 Beta arms, about 1,000 trials each. */
    @Benchmark
    public ProbabilityBest twentyBetaArms() {
        return exact.estimate(twentyBeta, 0);
    }

    /** 5 Student-t arms with 1,000 degrees of freedom. */
    @Benchmark
    public ProbabilityBest fiveStudentTArms() {
        return exact.estimate(fiveStudentT, 0);
    }

    /** Expected gains V_i of the 5 Beta arms. */
    @Benchmark
    public double[] fiveBetaValues() {
        return ExpectedGain.valueOfBeingBest(fiveBeta);
    }
}
