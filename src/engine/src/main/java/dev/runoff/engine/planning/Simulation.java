package dev.runoff.engine.planning;

import dev.runoff.engine.EngineConfig;
import dev.runoff.engine.allocation.AllocationMethod;
import dev.runoff.engine.stopping.Rule;
import java.util.ArrayList;
import java.util.List;
import java.util.Objects;
import java.util.concurrent.CompletableFuture;
import java.util.concurrent.CompletionException;
import java.util.concurrent.Executor;
import java.util.concurrent.ExecutorService;
import java.util.concurrent.Executors;
import java.util.concurrent.ThreadFactory;
import java.util.concurrent.atomic.AtomicInteger;

/**
 * Simulates experiments before they start: many replications of the streaming job's engine and stopping
 * rule on assumed true arms, in batched mode, plus uniform allocation on the same replication seeds as a
 * baseline.
 *
 * <p>Replications run in parallel on an injected {@link Executor}. Each replication is a pure function of
 * the configuration and its own seed, {@link #replicationSeed(long, int)}, and results are gathered in
 * replication order, so the result is the same for any number of threads and any scheduling.
 */
public final class Simulation {
    private static final long GOLDEN_GAMMA = 0x9E3779B97F4A7C15L;

    private Simulation() {
    }

    /**
     * Runs the simulation on {@code parallelism} daemon threads of a pool created for it and shut down after.
     *
     * @param parallelism number of threads, {@code >= 1}
     * @see #run(SimulationConfig, Executor, SimulationProgress)
     */
    public static SimulationResult run(SimulationConfig config, int parallelism, SimulationProgress progress) {
        if (parallelism < 1) {
            throw new IllegalArgumentException("parallelism must be >= 1, got " + parallelism);
        }
        ExecutorService pool = Executors.newFixedThreadPool(parallelism, daemonThreads());
        try {
            return run(config, pool, progress);
        } finally {
            pool.shutdownNow();
        }
    }

    /**
     * Runs every replication of the configured rule and, unless that rule is uniform already, of uniform
     * allocation with the same engine configuration otherwise, each on the same replication seeds.
     *
     * @param config   what to simulate
     * @param executor runs the replications; any executor, including a direct one ({@code Runnable::run})
     * @param progress told as runs finish (from the executor's threads)
     * @throws IllegalArgumentException if the engine or the stopping rule rejects the simulated arms
     */
    public static SimulationResult run(SimulationConfig config, Executor executor, SimulationProgress progress) {
        Objects.requireNonNull(config, "config");
        Objects.requireNonNull(executor, "executor");
        Objects.requireNonNull(progress, "progress");
        boolean baselineApart = config.engine().rule() != AllocationMethod.UNIFORM;
        EngineConfig uniform = config.engine().withRule(AllocationMethod.UNIFORM);
        Submitter submit = new Submitter(executor, progress, config.replications() * (baselineApart ? 2 : 1));
        List<CompletableFuture<SimulationRun>> rule = new ArrayList<>();
        List<CompletableFuture<SimulationRun>> baseline = new ArrayList<>();
        SimulationReplication ruleReplication = new SimulationReplication(config, config.engine());
        SimulationReplication uniformReplication = new SimulationReplication(config, uniform);
        for (int r = 0; r < config.replications(); r++) {
            long seed = replicationSeed(config.seed(), r);
            rule.add(submit.run(ruleReplication, seed));
            if (baselineApart) {
                baseline.add(submit.run(uniformReplication, seed));
            }
        }
        List<SimulationRun> ruleRuns = joinAll(rule, baseline);
        List<SimulationRun> baselineRuns = baselineApart ? joinAll(baseline, List.of()) : ruleRuns;
        return new SimulationResult(config, SimulationSummary.of(config.engine().rule(), ruleRuns),
                SimulationSummary.of(AllocationMethod.UNIFORM, baselineRuns), ruleRuns, baselineRuns);
    }

    /**
     * Runs the configured allocation rule once per stopping rule, each on the same replication seeds (so
     * until one rule stops, every rule sees the same trials: the comparison is paired), with no uniform
     * baseline.
     *
     * @param config   what to simulate; its stopping configuration gives delta, epsilon, guards and budget
     * @param rules    the stopping rules to compare, at least one, each supported by the arms' metric
     * @param executor runs the replications
     * @param progress told as runs finish
     * @return one comparison per rule, in the order given
     */
    public static List<StoppingComparison> compare(SimulationConfig config, List<Rule> rules, Executor executor,
                                                   SimulationProgress progress) {
        Objects.requireNonNull(config, "config");
        Objects.requireNonNull(executor, "executor");
        Objects.requireNonNull(progress, "progress");
        if (rules.isEmpty()) {
            throw new IllegalArgumentException("need at least one stopping rule to compare");
        }
        Submitter submit = new Submitter(executor, progress, config.replications() * rules.size());
        List<List<CompletableFuture<SimulationRun>>> futures = new ArrayList<>();
        for (Rule rule : rules) {
            SimulationConfig c = config.withStopping(config.stopping().withRule(rule));
            SimulationReplication replication = new SimulationReplication(c, c.engine());
            List<CompletableFuture<SimulationRun>> runs = new ArrayList<>();
            for (int r = 0; r < config.replications(); r++) {
                runs.add(submit.run(replication, replicationSeed(config.seed(), r)));
            }
            futures.add(runs);
        }
        List<CompletableFuture<SimulationRun>> all = futures.stream().flatMap(List::stream).toList();
        List<StoppingComparison> rows = new ArrayList<>();
        for (int i = 0; i < rules.size(); i++) {
            SimulationSummary summary = SimulationSummary.of(config.engine().rule(), joinAll(futures.get(i), all));
            rows.add(new StoppingComparison(rules.get(i), rules.get(i).provenFor(config.arms().metric()), summary));
        }
        return rows;
    }

    /**
     * Runs each allocation rule on the same replication seeds with the configured engine and stopping rule
     * (the engine's own rule is replaced), with no uniform baseline. Run i of every rule starts from the same
     * seed and, as the n-th outcome of an arm does not depend on the rule, sees the same outcomes: the
     * comparison is paired run by run.
     *
     * @param config      what to simulate
     * @param rules       the allocation rules, at least one
     * @param parallelism number of threads, {@code >= 1}
     * @return per rule, in the order given, its runs in replication order
     */
    public static List<List<SimulationRun>> pairedRuns(SimulationConfig config, List<AllocationMethod> rules,
                                                       int parallelism) {
        Objects.requireNonNull(config, "config");
        if (rules.isEmpty() || parallelism < 1) {
            throw new IllegalArgumentException("need at least one allocation rule and one thread, got "
                    + rules.size() + " rules and " + parallelism + " threads");
        }
        ExecutorService pool = Executors.newFixedThreadPool(parallelism, daemonThreads());
        try {
            Submitter submit = new Submitter(pool, SimulationProgress.NONE, config.replications() * rules.size());
            List<List<CompletableFuture<SimulationRun>>> futures = new ArrayList<>();
            for (AllocationMethod rule : rules) {
                SimulationReplication replication = new SimulationReplication(config, config.engine().withRule(rule));
                List<CompletableFuture<SimulationRun>> runs = new ArrayList<>();
                for (int r = 0; r < config.replications(); r++) {
                    runs.add(submit.run(replication, replicationSeed(config.seed(), r)));
                }
                futures.add(runs);
            }
            List<CompletableFuture<SimulationRun>> all = futures.stream().flatMap(List::stream).toList();
            List<List<SimulationRun>> out = new ArrayList<>();
            for (List<CompletableFuture<SimulationRun>> runs : futures) {
                out.add(joinAll(runs, all));
            }
            return out;
        } finally {
            pool.shutdownNow();
        }
    }

    /** {@link #compare(SimulationConfig, List, Executor, SimulationProgress)} on a pool of daemon threads. */
    public static List<StoppingComparison> compare(SimulationConfig config, List<Rule> rules, int parallelism,
                                                   SimulationProgress progress) {
        if (parallelism < 1) {
            throw new IllegalArgumentException("parallelism must be >= 1, got " + parallelism);
        }
        ExecutorService pool = Executors.newFixedThreadPool(parallelism, daemonThreads());
        try {
            return compare(config, rules, pool, progress);
        } finally {
            pool.shutdownNow();
        }
    }

    /**
     * The seed of replication {@code index}: the {@code (index + 1)}-th output of a SplitMix64 generator
     * started at {@code masterSeed} (Steele, Lea &amp; Flood 2014, "Fast splittable pseudorandom number
     * generators", OOPSLA), so nearby master seeds and indexes give unrelated seeds.
     *
     * @param masterSeed the simulation's seed
     * @param index      replication index, {@code >= 0}
     */
    public static long replicationSeed(long masterSeed, int index) {
        if (index < 0) {
            throw new IllegalArgumentException("replication index must be >= 0, got " + index);
        }
        long z = masterSeed + (index + 1L) * GOLDEN_GAMMA;
        z = (z ^ (z >>> 30)) * 0xBF58476D1CE4E5B9L;
        z = (z ^ (z >>> 27)) * 0x94D049BB133111EBL;
        return z ^ (z >>> 31);
    }

    /**
     * Waits for every future in order; on the first failure cancels the rest (and {@code others}) and
     * rethrows the failure's cause.
     */
    private static List<SimulationRun> joinAll(List<CompletableFuture<SimulationRun>> futures,
                                               List<CompletableFuture<SimulationRun>> others) {
        List<SimulationRun> runs = new ArrayList<>(futures.size());
        try {
            for (CompletableFuture<SimulationRun> f : futures) {
                runs.add(f.join());
            }
        } catch (CompletionException e) {
            futures.forEach(f -> f.cancel(false));
            others.forEach(f -> f.cancel(false));
            throw rethrown(e.getCause());
        }
        return runs;
    }

    private static RuntimeException rethrown(Throwable cause) {
        if (cause instanceof RuntimeException re) {
            return re;
        }
        if (cause instanceof Error err) {
            throw err;
        }
        return new IllegalStateException("a simulated run failed", cause);
    }

    private static ThreadFactory daemonThreads() {
        AtomicInteger count = new AtomicInteger();
        return task -> {
            Thread t = new Thread(task, "runoff-simulation-" + count.incrementAndGet());
            t.setDaemon(true);
            return t;
        };
    }

    /** Submits replications and reports each finished run. */
    private static final class Submitter {
        private final Executor executor;
        private final SimulationProgress progress;
        private final int total;
        private final AtomicInteger done = new AtomicInteger();

        Submitter(Executor executor, SimulationProgress progress, int total) {
            this.executor = executor;
            this.progress = progress;
            this.total = total;
        }

        CompletableFuture<SimulationRun> run(SimulationReplication replication, long seed) {
            return CompletableFuture.supplyAsync(() -> {
                SimulationRun run = replication.run(seed);
                progress.finished(done.incrementAndGet(), total);
                return run;
            }, executor);
        }
    }
}
