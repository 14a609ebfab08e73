package dev.runoff.cli;

import dev.runoff.engine.core.Checks;
import dev.runoff.engine.guardrail.Direction;
import dev.runoff.engine.EngineConfig;
import dev.runoff.engine.core.Metric;
import dev.runoff.engine.allocation.AllocationMethod;
import dev.runoff.engine.planning.Simulation;
import dev.runoff.engine.planning.ArmModel;
import dev.runoff.engine.planning.SimulationConfig;
import dev.runoff.engine.planning.SimulationProgress;
import dev.runoff.engine.planning.SimulationResult;
import dev.runoff.engine.planning.StoppingComparison;
import dev.runoff.engine.stopping.Rule;
import dev.runoff.engine.stopping.StoppingConfig;
import java.io.PrintWriter;
import java.util.Arrays;
import java.util.List;
import java.util.concurrent.Callable;
import java.util.function.Supplier;
import picocli.CommandLine.Command;
import picocli.CommandLine.Model.CommandSpec;
import picocli.CommandLine.Option;
import picocli.CommandLine.ParameterException;
import picocli.CommandLine.Spec;

/**
 * {@code runoff plan}: before an experiment starts, the optimal traffic split and predicted trials for
 * assumed true arm means, and a seeded simulation of the streaming job's engine and stopping rule against
 * uniform allocation.
 */
@Command(name = "plan", mixinStandardHelpOptions = true, versionProvider = VersionInfo.class,
        description = "Predict how much traffic an experiment needs: optimal weights, T* and predicted trials,"
                + " and a simulation of the allocation and stopping rules against uniform allocation.",
        exitCodeListHeading = ExitCodes.HEADING,
        exitCodeList = {"0:success", "1:internal error", "2:bad arguments"})
final class PlanCommand implements Callable<Integer> {
    /** Default trial budget of a simulated run, as a multiple of T* max(log(1/delta), 3). */
    static final int BUDGET_FACTOR = 20;
    /** Smallest log factor of the default budget: log(1/delta) for delta &lt;= 0.05, 3 above. */
    static final double MIN_LOG_FACTOR = 3;

    @Spec
    private CommandSpec spec;

    @Option(names = "--rates", split = ",", paramLabel = "P", hideParamSyntax = true,
            description = "True success rates of the arms, each in (0, 1), comma-separated: P1,P2,... (Bernoulli).")
    private double[] rates;

    @Option(names = "--means", split = ",", paramLabel = "M", hideParamSyntax = true,
            description = "True means of the arms, comma-separated, for a value metric (with --stddev; value per unit:"
                    + " of one unit's capped sum).")
    private double[] means;

    @Option(names = "--stddev", split = ",", paramLabel = "S", hideParamSyntax = true,
            description = "Standard deviation of one outcome: one value for every arm, or one per arm.")
    private double[] stddev;

    @Option(names = "--delta", paramLabel = "D", defaultValue = "0.05",
            description = "Error probability, in (0, 1) (default: ${DEFAULT-VALUE}).")
    private double delta;

    @Option(names = "--epsilon", paramLabel = "E", defaultValue = "0",
            description = "Indifference zone: a pick within E of the best mean is not an error; E > 0 allows tied"
                    + " best arms (default: ${DEFAULT-VALUE}).")
    private double epsilon;

    @Option(names = "--rule", converter = Spelling.Rules.class, completionCandidates = Spelling.Rules.class,
            paramLabel = "RULE", defaultValue = "top-two-thompson",
            description = "Allocation rule: ${COMPLETION-CANDIDATES} (default: ${DEFAULT-VALUE}).")
    private AllocationMethod rule;

    @Option(names = "--beta", paramLabel = "B", defaultValue = "0.5",
            description = "Leader's share in the top-two rules, in [0, 1] (default: ${DEFAULT-VALUE}).")
    private double beta;

    @Option(names = "--stopping", converter = StoppingChoice.class, completionCandidates = StoppingChoice.class,
            paramLabel = "RULE", defaultValue = "glr",
            description = "Stopping rule: ${COMPLETION-CANDIDATES} (default: ${DEFAULT-VALUE}). glr-heuristic is NOT"
                    + " proven; mixture is for --rates only, sequential-t for --means only; indifference needs --epsilon > 0;"
                    + " all compares every"
                    + " rule on the same seeds in one table.")
    private StoppingChoice.Selection stopping;

    @Option(names = "--batch", paramLabel = "N", defaultValue = "100",
            description = "Trials between two evaluations of the weights and the stopping rule"
                    + " (default: ${DEFAULT-VALUE}).")
    private int batch;

    @Option(names = "--simulate", paramLabel = "R", defaultValue = "200",
            description = "Simulated experiments per rule, 0 for none (default: ${DEFAULT-VALUE}).")
    private int replications;

    @Option(names = "--seed", paramLabel = "S", defaultValue = "1",
            description = "Master seed of the simulation (default: ${DEFAULT-VALUE}).")
    private long seed;

    @Option(names = "--budget-trials", paramLabel = "N",
            description = "Trial budget of each simulated experiment (default: " + BUDGET_FACTOR
                    + " x T* x max(log(1/delta), 3), i.e. " + BUDGET_FACTOR + " x the predicted trials for"
                    + " delta <= 0.05).")
    private Long budgetTrials;

    @Option(names = "--threads", paramLabel = "N",
            description = "Threads for the simulation (default: the number of processors); results do not"
                    + " depend on it.")
    private Integer threads;

    @Option(names = "--guardrail-rate", paramLabel = "P",
            description = "The control's rate of a guardrail metric, in (0, 1): adds the units per arm before an"
                    + " arm as good as the control passes the guardrail.")
    private Double guardrailRate;

    @Option(names = "--guardrail-margin", paramLabel = "M", defaultValue = "0.1",
            description = "Relative margin of the guardrail (default: ${DEFAULT-VALUE}).")
    private double guardrailMargin;

    @Option(names = "--guardrail-alpha", paramLabel = "A", defaultValue = "0.05",
            description = "Error level of the guardrail (default: ${DEFAULT-VALUE}).")
    private double guardrailAlpha;

    @Option(names = "--guardrail-direction", converter = Spelling.Directions.class,
            completionCandidates = Spelling.Directions.class, paramLabel = "D", defaultValue = "higher-is-worse",
            description = "Which way the guardrail rate is bad: ${COMPLETION-CANDIDATES} (default: ${DEFAULT-VALUE}).")
    private Direction guardrailDirection;

    @Option(names = "--json", description = "Print one JSON object instead of tables.")
    private boolean json;

    @Override
    public Integer call() {
        ArmModel arms = arms();
        named("--delta", delta, () -> StoppingConfig.glr(delta));
        named("--epsilon", epsilon, () -> Checks.nonNegative("epsilon", epsilon));
        named("--beta", beta, () -> EngineConfig.defaults(arms.metric()).withBeta(beta));
        checkCounts();
        checkTies(arms);
        checkStopping(arms);
        PlanFigures plan = PlanFigures.of(arms, delta, epsilon, rule, beta);
        boolean simulate = replications > 0;
        SimulationResult simulation = simulate && !stopping.all() ? simulate(arms, plan) : null;
        PlanReport.Comparison comparison = simulate && stopping.all() ? compare(arms, plan) : null;
        PrintWriter out = spec.commandLine().getOut();
        PlanReport report = new PlanReport(plan, simulation, comparison);
        if (guardrailRate != null) {
            report.withGuardrail(named("--guardrail-rate", guardrailRate, () -> GuardrailFigure.of(guardrailRate,
                    guardrailMargin, guardrailDirection, guardrailAlpha)));
        }
        out.print(json ? report.json() + System.lineSeparator() : report.text());
        out.flush();
        return 0;
    }

    private ArmModel arms() {
        if ((rates == null) == (means == null)) {
            throw usage("give either --rates (Bernoulli) or --means with --stddev (value metric)");
        }
        if (rates != null) {
            if (stddev != null) {
                throw usage("--stddev goes with --means, not with --rates");
            }
            return named("--rates", joined(rates), () -> ArmModel.bernoulli(rates));
        }
        if (stddev == null) {
            throw usage("--means needs --stddev");
        }
        double[] s = stddev.length == 1 ? filled(means.length, stddev[0]) : stddev;
        if (s.length != means.length) {
            throw usage("--stddev: give one value or one per arm (" + means.length + "), got " + stddev.length);
        }
        return named("--means", joined(means), () -> ArmModel.gaussianStddevs(means, s));
    }

    private void checkCounts() {
        if (batch < 1) {
            throw usage("--batch must be >= 1, got " + batch);
        }
        if (replications < 0) {
            throw usage("--simulate must be >= 0, got " + replications);
        }
        if (budgetTrials != null && budgetTrials < 1) {
            throw usage("--budget-trials must be >= 1, got " + budgetTrials);
        }
        if (threads != null && threads < 1) {
            throw usage("--threads must be >= 1, got " + threads);
        }
    }

    private void checkStopping(ArmModel arms) {
        if (stopping.all()) {
            return;
        }
        if (!stopping.rule().supports(arms.metric())) {
            throw usage("--stopping " + Spelling.of(stopping.rule()) + " is for "
                    + (arms.metric() == Metric.VALUE ? "--rates (Bernoulli arms)" : "--means (value arms)") + " only");
        }
        if (stopping.rule() == Rule.INDIFFERENCE && epsilon == 0) {
            throw usage("--stopping indifference needs an indifference zone --epsilon > 0");
        }
    }

    private void checkTies(ArmModel arms) {
        if (!arms.bestIsTied()) {
            return;
        }
        String option = arms.metric() == Metric.BERNOULLI ? "--rates" : "--means";
        if (epsilon == 0) {
            throw usage(option + ": " + tiedNames(arms) + " share the best mean " + arms.bestMean()
                    + "; the best arm is not unique: give an indifference zone --epsilon > 0");
        }
        if (replications > 0 && budgetTrials == null) {
            throw usage(option + ": with tied best arms there is no finite prediction to size the budget:"
                    + " give --budget-trials");
        }
    }

    private static String tiedNames(ArmModel arms) {
        StringBuilder b = new StringBuilder();
        for (int a = 0; a < arms.size(); a++) {
            if (arms.mean(a) == arms.bestMean()) {
                b.append(b.length() == 0 ? "" : " and ").append(ArmModel.name(a));
            }
        }
        return b.toString();
    }

    /**
     * The trial budget of a simulated run: {@code --budget-trials}, or {@link #BUDGET_FACTOR} x
     * round(T* max(log(1/delta), {@link #MIN_LOG_FACTOR})), which is {@link #BUDGET_FACTOR} x the predicted
     * trials round(T* log(1/delta)) for delta up to 0.05. The floor keeps room for the GLR threshold's log t term, which
     * dominates at large delta.
     */
    private long budget(PlanFigures plan) {
        if (budgetTrials != null) {
            return budgetTrials;
        }
        if (plan.optimal() == null) {
            throw new IllegalStateException("no prediction to size the budget with");
        }
        double logFactor = Math.max(-StrictMath.log(delta), MIN_LOG_FACTOR);
        return Math.max(1, BUDGET_FACTOR * Math.round(plan.optimal().characteristicTime() * logFactor));
    }

    private SimulationResult simulate(ArmModel arms, PlanFigures plan) {
        return Simulation.run(simulationConfig(arms, plan, stopping.rule()), parallelism(), progress());
    }

    /** Every rule of {@code --stopping all} on the same seeds, with the configured allocation rule. */
    private PlanReport.Comparison compare(ArmModel arms, PlanFigures plan) {
        List<Rule> rules = stopping.rulesFor(arms.metric(), epsilon);
        SimulationConfig config = simulationConfig(arms, plan, rules.get(0));
        List<StoppingComparison> rows = Simulation.compare(config, rules, parallelism(), progress());
        return new PlanReport.Comparison(config, rows);
    }

    /** The simulation of {@code stoppingRule}; with an indifference zone its epsilon is {@code --epsilon}. */
    private SimulationConfig simulationConfig(ArmModel arms, PlanFigures plan, Rule stoppingRule) {
        StoppingConfig base = epsilon > 0 ? StoppingConfig.indifference(delta, epsilon) : StoppingConfig.glr(delta);
        StoppingConfig stop = base.withRule(stoppingRule).withBudgetTrials(budget(plan));
        EngineConfig engine = EngineConfig.defaults(arms.metric()).withRule(rule).withBeta(beta);
        return new SimulationConfig(arms, engine, stop, batch, replications, seed, epsilon);
    }

    private int parallelism() {
        return threads == null ? Runtime.getRuntime().availableProcessors() : threads;
    }

    /** A progress bar on standard error, only on a terminal and not with --json. */
    private SimulationProgress progress() {
        if (json || System.console() == null) {
            return SimulationProgress.NONE;
        }
        return new ProgressBar(spec.commandLine().getErr());
    }

    private ParameterException usage(String message) {
        return new ParameterException(spec.commandLine(), message);
    }

    private static double[] filled(int n, double value) {
        double[] x = new double[n];
        Arrays.fill(x, value);
        return x;
    }

    private static String joined(double[] values) {
        StringBuilder b = new StringBuilder();
        for (double v : values) {
            b.append(b.length() == 0 ? "" : ",").append(Posteriors.number(v));
        }
        return b.toString();
    }

    /** Runs {@code check}; an IllegalArgumentException becomes one naming {@code option} and {@code value}. */
    private static <T> T named(String option, Object value, Supplier<T> check) {
        try {
            return check.get();
        } catch (IllegalArgumentException e) {
            throw new IllegalArgumentException(option + " " + value + ": " + e.getMessage(), e);
        }
    }
}
