package dev.runoff.bench;

import dev.runoff.engine.EngineConfig;
import dev.runoff.engine.core.Metric;
import dev.runoff.engine.planning.Simulation;
import dev.runoff.engine.planning.ArmModel;
import dev.runoff.engine.planning.SimulationConfig;
import dev.runoff.engine.planning.SimulationProgress;
import dev.runoff.engine.planning.SimulationResult;
import dev.runoff.engine.stopping.StoppingConfig;
import java.util.concurrent.TimeUnit;
import org.openjdk.jmh.annotations.Benchmark;
import org.openjdk.jmh.annotations.BenchmarkMode;
import org.openjdk.jmh.annotations.Mode;
import org.openjdk.jmh.annotations.OutputTimeUnit;
import org.openjdk.jmh.annotations.Scope;
import org.openjdk.jmh.annotations.State;

/**
 * One replication of {@code runoff plan --rates 0.1,0.2,0.3,0.4,0.5 --delta 0.01 --batch 100} on one thread:
 * a top-two Thompson run and its uniform baseline, engine defaults (exact alpha), GLR stopping. Each call uses
 * the next master seed, so the figure averages over replications; {@code --simulate R} costs about R times it,
 * divided by the number of cores.
 */
@State(Scope.Thread)
@BenchmarkMode(Mode.AverageTime)
@OutputTimeUnit(TimeUnit.MILLISECONDS)
public class SimulationBench {
    private static final ArmModel ARMS = ArmModel.bernoulli(0.1, 0.2, 0.3, 0.4, 0.5);
    private static final StoppingConfig STOPPING = StoppingConfig.glr(0.01).withBudgetTrials(20_240);

    private long seed;

    /** One replication pair (rule and uniform baseline) on the calling thread. */
    @Benchmark
    public SimulationResult replication() {
        SimulationConfig c = new SimulationConfig(ARMS, EngineConfig.defaults(Metric.BERNOULLI), STOPPING, 100, 1,
                seed++, 0.0);
        return Simulation.run(c, Runnable::run, SimulationProgress.NONE);
    }
}
