package dev.runoff.cli;

import dev.runoff.engine.AllocationEngine;
import dev.runoff.engine.core.Arm;
import dev.runoff.engine.EngineConfig;
import dev.runoff.engine.EngineVersion;
import dev.runoff.engine.Evaluation;
import dev.runoff.engine.core.Metric;
import dev.runoff.engine.allocation.AllocationMethod;
import dev.runoff.engine.allocation.Guards;
import dev.runoff.engine.posterior.BetaPrior;
import dev.runoff.engine.posterior.NormalGammaPrior;
import dev.runoff.engine.posterior.Prior;
import dev.runoff.engine.stats.BernoulliStats;
import dev.runoff.records.Definitions;
import java.io.PrintWriter;
import java.util.List;
import java.util.concurrent.Callable;
import java.util.function.UnaryOperator;
import picocli.CommandLine.Command;
import picocli.CommandLine.Model.CommandSpec;
import picocli.CommandLine.Option;
import picocli.CommandLine.ParameterException;
import picocli.CommandLine.Spec;

/** {@code runoff evaluate}: posteriors, probability of being best and weights for arms given on the command line. */
@Command(name = "evaluate", mixinStandardHelpOptions = true, versionProvider = VersionInfo.class,
        description = "Evaluate arms: posterior, probability of being best, and the next period's weights.",
        exitCodeListHeading = ExitCodes.HEADING,
        exitCodeList = {"0:success", "1:internal error", "2:bad arguments"})
final class EvaluateCommand implements Callable<Integer> {

    @Spec
    private CommandSpec spec;

    @Option(names = "--arm", required = true, converter = ArmConverter.class,
            paramLabel = "ARM",
            description = "An arm: NAME=SUCCESSES/TRIALS (Bernoulli), or NAME=COUNT:MEAN:STDDEV with the sample"
                    + " standard deviation (--metric value). Repeat for each arm, at least two.")
    private List<Arm> arms;

    @Option(names = "--metric", converter = Spelling.Metrics.class, completionCandidates = Spelling.Metrics.class,
            paramLabel = "METRIC",
            defaultValue = "bernoulli", description = "bernoulli or value (default: ${DEFAULT-VALUE}).")
    private Metric metric;

    @Option(names = "--method", converter = Spelling.Methods.class, completionCandidates = Spelling.Methods.class,
            paramLabel = "METHOD",
            description = "monte-carlo (the default, as in the job), exact, or auto (exact up to "
                    + AllocationEngine.EXACT_ARM_LIMIT + " arms, Monte Carlo beyond).")
    private EngineConfig.MethodChoice method;

    @Option(names = "--draws", paramLabel = "N", description = "The most Monte Carlo joint draws: a first stage, doubled"
            + " until what the weights read is precise enough (engine 1.3: 1,000 first; 1.2: 10,000 first, doubled while"
            + " the leader and the runner-up cannot be ordered) (default: " + EngineConfig.DEFAULT_DRAWS + ").")
    private Integer draws;

    @Option(names = "--engine-version", paramLabel = "V", description = "The engine's arithmetic: one of the versions"
            + " audit verify reproduces (default: the one new decisions use; --version names both).")
    private String engineVersion;

    @Option(names = "--seed", paramLabel = "S", defaultValue = "0",
            description = "Seed of the Monte Carlo stream (default: ${DEFAULT-VALUE}).")
    private long seed;

    @Option(names = "--rule", converter = Spelling.Rules.class, completionCandidates = Spelling.Rules.class,
            paramLabel = "RULE",
            description = "Allocation rule: ${COMPLETION-CANDIDATES} (default: top-two-thompson).")
    private AllocationMethod rule;

    @Option(names = "--beta", paramLabel = "B", description = "Leader's share in the top-two rules, in [0, 1]"
            + " (default: " + EngineConfig.DEFAULT_BETA + ").")
    private Double beta;

    @Option(names = "--prior", split = ",", paramLabel = "PRIOR", hideParamSyntax = true,
            description = "Beta prior A,B (default 1,1), or with --metric value a Normal-Gamma prior"
                    + " MU0,KAPPA0,ALPHA0,BETA0 (default 0,0.001,1,0.001).")
    private double[] prior;

    @Option(names = "--warm-up", paramLabel = "N", description = "Equal weights until every arm has N trials.")
    private Long warmUp;

    @Option(names = "--floor", paramLabel = "F", description = "Minimum weight of every arm.")
    private Double floor;

    @Option(names = "--control", paramLabel = "NAME=SHARE", converter = ControlConverter.class,
            description = "A control arm with a fixed share of traffic.")
    private Guards.ControlShare control;

    @Option(names = "--json", description = "Print one JSON object instead of a table.")
    private boolean json;

    @Override
    public Integer call() {
        EngineConfig config = config();
        AllocationEngine engine = engine();
        Evaluation evaluation;
        try {
            evaluation = engine.evaluate(arms, config, seed);
        } catch (IllegalArgumentException e) {
            throw new ParameterException(spec.commandLine(), e.getMessage(), e);
        }
        PrintWriter out = spec.commandLine().getOut();
        if (json) {
            out.println(JsonReport.render(arms, config, evaluation));
        } else {
            out.print(TableReport.render(arms, config, evaluation));
        }
        out.flush();
        return 0;
    }

    private AllocationEngine engine() {
        if (engineVersion == null) {
            return new AllocationEngine();
        }
        try {
            return new AllocationEngine(EngineVersion.of(engineVersion));
        } catch (IllegalArgumentException e) {
            throw new ParameterException(spec.commandLine(), "--engine-version " + engineVersion + ": "
                    + e.getMessage(), e);
        }
    }

    private EngineConfig config() {
        for (Arm arm : arms) {
            if ((arm.stats() instanceof BernoulliStats) != (metric == Metric.BERNOULLI)) {
                throw new ParameterException(spec.commandLine(), "--arm " + arm.name() + ": "
                        + (metric == Metric.BERNOULLI ? "COUNT:MEAN:STDDEV needs --metric value"
                                : "SUCCESSES/TRIALS needs --metric bernoulli"));
            }
        }
        EngineConfig c = EngineConfig.defaults(metric);
        c = set(c, "--prior", prior == null ? null : joined(prior), x -> x.withPrior(prior()));
        c = set(c, "--rule", rule, x -> x.withRule(rule));
        c = set(c, "--beta", beta, x -> x.withBeta(beta));
        c = set(c, "--method", method, x -> x.withMethod(method));
        c = set(c, "--draws", draws, x -> x.withDraws(draws));
        c = set(c, "--warm-up", warmUp, x -> x.withGuards(x.guards().withWarmUp(warmUp)));
        c = set(c, "--floor", floor, x -> x.withGuards(x.guards().withFloor(floor)));
        return set(c, "--control", control, x -> x.withGuards(x.guards().withControl(control.arm(), control.share())));
    }

    /** Applies an option given on the command line; a validation failure becomes a usage error naming it. */
    private EngineConfig set(EngineConfig c, String option, Object value, UnaryOperator<EngineConfig> change) {
        if (value == null) {
            return c;
        }
        try {
            return change.apply(c);
        } catch (IllegalArgumentException e) {
            throw new ParameterException(spec.commandLine(), option + " " + value + ": " + e.getMessage(), e);
        }
    }

    private static String joined(double[] values) {
        StringBuilder b = new StringBuilder();
        for (double v : values) {
            b.append(b.length() == 0 ? "" : ",").append(v);
        }
        return b.toString();
    }

    /** The floor definitions apply to Beta prior shapes ({@code metric.prior.a} / {@code .b}), with their message. */
    private static void checkShape(String name, double shape) {
        String problem = Definitions.betaPriorShapeProblem(shape);
        if (problem != null) {
            throw new IllegalArgumentException("prior " + name + " " + problem);
        }
    }

    private Prior prior() {
        if (metric == Metric.BERNOULLI) {
            if (prior.length != 2) {
                throw new IllegalArgumentException("expected A,B for the Bernoulli metric");
            }
            BetaPrior beta = new BetaPrior(prior[0], prior[1]);
            checkShape("a", prior[0]);
            checkShape("b", prior[1]);
            return beta;
        }
        if (prior.length != 4) {
            throw new IllegalArgumentException("expected MU0,KAPPA0,ALPHA0,BETA0 for the value metric");
        }
        return new NormalGammaPrior(prior[0], prior[1], prior[2], prior[3]);
    }
}
