package dev.runoff.demo;

import dev.runoff.engine.planning.Simulation;
import dev.runoff.engine.planning.ArmModel;
import dev.runoff.engine.planning.SimulationConfig;
import dev.runoff.engine.planning.SimulationProgress;
import dev.runoff.engine.planning.SimulationResult;
import dev.runoff.records.avro.ExperimentDefinition;
import dev.runoff.decision.DefinitionConfigs;
import dev.runoff.topology.TopologySettings;
import java.time.Duration;
import java.util.Optional;
import java.util.concurrent.ExecutionException;
import java.util.concurrent.ExecutorService;
import java.util.concurrent.Executors;
import java.util.concurrent.Future;
import java.util.concurrent.TimeUnit;
import java.util.concurrent.TimeoutException;

/**
 * The planner's simulation of the demo experiment, run on one background daemon thread while the demo runs:
 * the same hidden rates, the engine and stopping configurations the job derives from the demo's definition
 * (top-two rule, beta, warm-up guard; GLR with the proven threshold, delta, minimum trials, budget), one
 * evaluation per period's visitors, under the demo's rule and under a uniform split on the same seeds. It
 * gives the like-for-like comparison the asymptotic prediction cannot: visitors to STOP at a finite delta.
 * Closing it stops waiting and shuts the thread's executor down.
 */
final class DemoSimulation implements AutoCloseable {

    /** Simulated experiments per allocation rule. */
    static final int REPLICATIONS = 40;

    private final ExecutorService executor;
    private final Future<SimulationResult> result;

    private DemoSimulation(SimulationConfig config) {
        executor = Executors.newSingleThreadExecutor(task -> {
            Thread t = new Thread(task, "runoff-demo-simulation");
            t.setDaemon(true);
            return t;
        });
        // a direct executor: the replications run one after another on this single background thread
        result = executor.submit(() -> Simulation.run(config, Runnable::run, SimulationProgress.NONE));
    }

    /**
     * Starts simulating {@code definition} on the true {@code rates}.
     *
     * @param batch visitors between two evaluations (the demo's visitors per period)
     * @param seed  master seed of the replications
     */
    static DemoSimulation start(ExperimentDefinition definition, double[] rates, int batch, long seed) {
        return new DemoSimulation(config(definition, rates, batch, seed));
    }

    /** The simulation's configuration: the job's mapping of {@code definition}, {@link #REPLICATIONS} runs. */
    static SimulationConfig config(ExperimentDefinition definition, double[] rates, int batch, long seed) {
        return new SimulationConfig(ArmModel.bernoulli(rates),
                DefinitionConfigs.engine(definition, TopologySettings.MONTE_CARLO_DRAWS),
                DefinitionConfigs.stopping(definition), batch, REPLICATIONS, seed, 0.0);
    }

    /**
     * The result, waiting for it at most {@code patience}; empty when it is not ready by then.
     *
     * @throws IllegalStateException when the simulation failed
     */
    Optional<SimulationResult> await(Duration patience) throws InterruptedException {
        try {
            return Optional.of(result.get(patience.toMillis(), TimeUnit.MILLISECONDS));
        } catch (TimeoutException e) {
            return Optional.empty();
        } catch (ExecutionException e) {
            throw new IllegalStateException("the demo's planner simulation failed: " + e.getCause(), e.getCause());
        }
    }

    @Override
    public void close() {
        result.cancel(true);
        executor.shutdownNow();
    }
}
