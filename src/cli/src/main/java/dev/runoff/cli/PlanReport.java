package dev.runoff.cli;

import com.fasterxml.jackson.core.JsonProcessingException;
import com.fasterxml.jackson.databind.ObjectMapper;
import com.fasterxml.jackson.databind.node.ArrayNode;
import com.fasterxml.jackson.databind.node.ObjectNode;
import dev.runoff.engine.core.Metric;
import dev.runoff.engine.allocation.AllocationMethod;
import dev.runoff.engine.planning.ArmModel;
import dev.runoff.engine.planning.SimulationConfig;
import dev.runoff.engine.planning.SimulationResult;
import dev.runoff.engine.planning.SimulationSummary;
import dev.runoff.engine.planning.StoppingComparison;
import dev.runoff.engine.planning.TargetAllocation;
import java.util.ArrayList;
import java.util.List;
import java.util.Locale;
import java.util.function.Function;

/**
 * The output of {@code plan}: a planning table and, with a simulation, a table per rule; or one JSON object.
 * Arrays and rows are in the order of the arms given. Non-finite numbers are written as null in JSON.
 */
final class PlanReport {
    private static final ObjectMapper MAPPER = new ObjectMapper();
    private static final String NL = System.lineSeparator();

    private final PlanFigures plan;
    private final SimulationResult simulation;
    private final Comparison comparison;
    private GuardrailFigure guardrail;

    /**
     * A report of the planning figures and, unless null, the simulation of one stopping rule against uniform
     * allocation and the comparison of stopping rules ({@code --stopping all}).
     */
    PlanReport(PlanFigures plan, SimulationResult simulation, Comparison comparison) {
        this.plan = plan;
        this.simulation = simulation;
        this.comparison = comparison;
    }

    /** This report with the guardrail line {@code figure}. */
    PlanReport withGuardrail(GuardrailFigure figure) {
        this.guardrail = figure;
        return this;
    }

    /**
     * Stopping rules compared on the same replication seeds.
     *
     * @param config what was simulated (the stopping rule of the first row; delta, budget and guards of all)
     * @param rows   one row per rule
     */
    record Comparison(SimulationConfig config, List<StoppingComparison> rows) {
        Comparison {
            rows = List.copyOf(rows);
        }
    }

    /** The tables. */
    String text() {
        ArmModel arms = plan.arms();
        StringBuilder out = new StringBuilder();
        out.append(String.format(Locale.ROOT, "Plan for %d %s arms, delta %s, epsilon %s%n%n", arms.size(),
                arms.metric() == Metric.BERNOULLI ? "Bernoulli" : "value", Posteriors.number(plan.delta()),
                Posteriors.number(plan.epsilon())));
        out.append(plan.optimal() == null ? noPlanning() : planning());
        if (simulation != null) {
            out.append(NL).append(simulationText());
        }
        if (comparison != null) {
            out.append(NL).append(comparisonText());
        }
        if (guardrail != null) {
            out.append(NL).append(guardrail.text());
        }
        return out.toString();
    }

    /** One row per stopping rule, on the same replication seeds. */
    private String comparisonText() {
        SimulationConfig c = comparison.config();
        StringBuilder out = new StringBuilder(String.format(Locale.ROOT,
                "Stopping rules: %d runs each on the same seeds, %s, batch %d, budget %d trials per run, seed %d%n",
                c.replications(), plan.rule().cliName(), c.batch(), c.budgetTrials(), c.seed()));
        Columns table = new Columns();
        table.row("stopping", "proven", "mean trials", "median trials", "90th percentile trials", "wrong picks",
                "error rate", "95% interval (Clopper-Pearson)", "budget stops");
        for (StoppingComparison row : comparison.rows()) {
            SimulationSummary s = row.summary();
            table.row(Spelling.of(row.stopping()), row.proven() ? "yes" : "NO", fixed(s.meanTrials(), 1),
                    fixed(s.medianTrials(), 1), Long.toString(s.p90Trials()), s.errors() + "/" + s.replications(),
                    fixed(s.errorRate(), 4), "[" + fixed(s.errorInterval().lower(), 4) + ", "
                            + fixed(s.errorInterval().upper(), 4) + "]", Integer.toString(s.budgetStops()));
        }
        out.append(table.render());
        out.append("proven: error probability at most delta for every fixed truth (glr on --means plugs in sample"
                + " variances, so it is not counted as proven); a NO rule can exceed delta.").append(NL);
        return out.toString();
    }


    private String noPlanning() {
        return "Planning: the best arm is not unique, so the optimal allocation is undefined and T* is infinite;"
                + NL + "the GLR rule cannot separate tied arms: expect runs to end on the budget." + NL;
    }

    private String planning() {
        List<TargetAllocation> targets = targets();
        Columns table = new Columns();
        List<String> header = new ArrayList<>(List.of("arm", meanLabel(), "optimal"));
        if (targets.size() == 3) {
            header.add("beta-optimal");
        }
        header.add("uniform");
        table.row(header.toArray(String[]::new));
        for (int a = 0; a < plan.arms().size(); a++) {
            int arm = a;
            List<String> row = new ArrayList<>(List.of(ArmModel.name(a), Posteriors.number(plan.arms().mean(a))));
            targets.forEach(t -> row.add(fixed(t.weight(arm), 4)));
            table.row(row.toArray(String[]::new));
        }
        table.row(figures("T_w", targets, t -> fixed(t.characteristicTime(), 1)));
        table.row(figures("T_w log(1/delta)", targets, t -> Long.toString(plan.predicted(t))));
        StringBuilder out = new StringBuilder("Planning (asymptotic)").append(NL).append(table.render());
        out.append("optimal: the split w* of Garivier & Kaufmann (2016)");
        if (targets.size() == 3) {
            out.append("; beta-optimal: the long-run split of ").append(plan.rule().cliName()).append(" with beta ")
                    .append(Posteriors.number(plan.beta())).append(" (Russo 2020)");
        }
        out.append(NL).append("T_w: trials per unit of log(1/delta) when sampling with the split w").append(NL);
        out.append(String.format(Locale.ROOT, "T* = %s; predicted trials T* log(1/delta) = %d%n",
                fixed(plan.optimal().characteristicTime(), 1), plan.predictedTrials()));
        out.append(String.format(Locale.ROOT, "Evidence rates per 1,000 trials (growth of -ln P(best) of the slowest"
                + " losing arm): Gamma*_beta %s at beta %s; uniform split %s; best split 1000/T* %s%n",
                fixed(plan.betaOptimalRate(), 3), Posteriors.number(plan.beta()), fixed(plan.uniformRate(), 3),
                fixed(plan.optimalRate(), 3)));
        return out.toString();
    }

    /** Optimal, then the rule's target when it differs from uniform and is defined, then uniform. */
    private List<TargetAllocation> targets() {
        List<TargetAllocation> targets = new ArrayList<>(List.of(plan.optimal()));
        if (plan.rule() != AllocationMethod.UNIFORM && plan.ruleTarget() != null) {
            targets.add(plan.ruleTarget());
        }
        targets.add(plan.uniform());
        return targets;
    }

    private static String[] figures(String label, List<TargetAllocation> targets,
                                    Function<TargetAllocation, String> cell) {
        List<String> row = new ArrayList<>(List.of(label, ""));
        targets.forEach(t -> row.add(cell.apply(t)));
        return row.toArray(String[]::new);
    }

    private String simulationText() {
        SimulationConfig c = simulation.config();
        List<SimulationSummary> columns = summaries();
        StringBuilder out = new StringBuilder(String.format(Locale.ROOT,
                "Simulation: %d runs per rule, batch %d, %s stopping, budget %d trials per run, seed %d%n",
                c.replications(), c.batch(), Spelling.of(c.stopping().rule()), c.budgetTrials(), c.seed()));
        Columns table = new Columns();
        table.row(row("", columns, s -> s.rule().cliName()));
        table.row(row("mean trials", columns, s -> fixed(s.meanTrials(), 1)));
        table.row(row("median trials", columns, s -> fixed(s.medianTrials(), 1)));
        table.row(row("90th percentile trials", columns, s -> Long.toString(s.p90Trials())));
        table.row(row("wrong picks", columns, s -> s.errors() + "/" + s.replications()));
        table.row(row("error rate", columns, s -> fixed(s.errorRate(), 4)));
        table.row(row("95% interval (Clopper-Pearson)", columns, s -> "[" + fixed(s.errorInterval().lower(), 4)
                + ", " + fixed(s.errorInterval().upper(), 4) + "]"));
        table.row(row("budget stops", columns, s -> Integer.toString(s.budgetStops())));
        for (int a = 0; a < plan.arms().size(); a++) {
            int arm = a;
            table.row(row("traffic share " + ArmModel.name(a), columns, s -> fixed(s.armShares()[arm], 4)));
        }
        out.append(table.render());
        if (columns.size() == 2) {
            out.append(String.format(Locale.ROOT, "mean trials %s / uniform: %s (asymptotic T_rule / T_uniform: %s)%n",
                    plan.rule().cliName(), fixed(simulation.trialRatio(), 3), fixed(plan.asymptoticRatio(), 3)));
        }
        return out.toString();
    }

    /** The rule's summary, then the baseline's unless the rule is uniform. */
    private List<SimulationSummary> summaries() {
        return plan.rule() == AllocationMethod.UNIFORM ? List.of(simulation.rule())
                : List.of(simulation.rule(), simulation.baseline());
    }

    private static String[] row(String label, List<SimulationSummary> columns,
                                Function<SimulationSummary, String> cell) {
        List<String> row = new ArrayList<>(List.of(label));
        columns.forEach(s -> row.add(cell.apply(s)));
        return row.toArray(String[]::new);
    }

    private String meanLabel() {
        return plan.arms().metric() == Metric.BERNOULLI ? "rate" : "mean";
    }

    private static String fixed(double x, int decimals) {
        return Double.isFinite(x) ? String.format(Locale.ROOT, "%." + decimals + "f", x) : "n/a";
    }

    /** One JSON object. */
    String json() {
        ObjectNode root = MAPPER.createObjectNode();
        ArmModel arms = plan.arms();
        root.put("metric", Spelling.of(arms.metric()));
        ArrayNode names = root.putArray("arms");
        arms.names().forEach(names::add);
        numbers(root.putArray("means"), arms.means());
        if (arms.metric() == Metric.VALUE) {
            ArrayNode sd = root.putArray("stddevs");
            for (int a = 0; a < arms.size(); a++) {
                number(sd, arms.stddev(a));
            }
        }
        number(root, "delta", plan.delta());
        number(root, "epsilon", plan.epsilon());
        if (plan.optimal() == null) {
            root.putNull("optimalWeights");
            root.putNull("characteristicTime");
            root.putNull("predictedTrials");
            root.putNull("ruleTarget");
            root.putNull("uniformTarget");
        } else {
            numbers(root.putArray("optimalWeights"), plan.optimal().weights());
            number(root, "characteristicTime", plan.optimal().characteristicTime());
            root.put("predictedTrials", plan.predictedTrials());
            target(root, "ruleTarget", plan.ruleTarget());
            target(root, "uniformTarget", plan.uniform());
        }
        number(root, "betaOptimalRatePer1000Trials", plan.betaOptimalRate());
        number(root, "uniformRatePer1000Trials", plan.uniformRate());
        number(root, "optimalRatePer1000Trials", plan.optimalRate());
        if (simulation != null) {
            root.set("simulation", summary(simulation.rule(), true));
            root.set("baseline", summary(simulation.baseline(), false));
            number(root, "trialRatio", simulation.trialRatio());
            number(root, "asymptoticRatio", plan.asymptoticRatio());
        }
        if (comparison != null) {
            comparisonJson(root);
        }
        if (guardrail != null) {
            guardrail.json(root);
        }
        try {
            return MAPPER.writeValueAsString(root);
        } catch (JsonProcessingException e) {
            throw new IllegalStateException("cannot write the JSON report", e);
        }
    }

    /** {@code stoppingComparison}: one object per rule, with the simulation's settings beside it. */
    private void comparisonJson(ObjectNode root) {
        SimulationConfig c = comparison.config();
        ObjectNode settings = root.putObject("stoppingComparisonSettings");
        settings.put("rule", plan.rule().cliName());
        settings.put("replications", c.replications());
        settings.put("batch", c.batch());
        settings.put("seed", c.seed());
        settings.put("budgetTrials", c.budgetTrials());
        ArrayNode rows = root.putArray("stoppingComparison");
        for (StoppingComparison row : comparison.rows()) {
            SimulationSummary s = row.summary();
            ObjectNode n = rows.addObject();
            n.put("stopping", Spelling.of(row.stopping()));
            number(n, "meanTrials", s.meanTrials());
            number(n, "medianTrials", s.medianTrials());
            n.put("p90Trials", s.p90Trials());
            n.put("errors", s.errors());
            n.put("replications", s.replications());
            number(n, "errorRate", s.errorRate());
            interval(n, s);
            n.put("proven", row.proven());
            n.put("budgetStops", s.budgetStops());
        }
    }

    private static void interval(ObjectNode n, SimulationSummary s) {
        ObjectNode interval = n.putObject("errorInterval");
        interval.put("method", "clopper-pearson");
        number(interval, "level", s.errorInterval().level());
        number(interval, "lower", s.errorInterval().lower());
        number(interval, "upper", s.errorInterval().upper());
    }

    private void target(ObjectNode root, String field, TargetAllocation t) {
        if (t == null) {
            root.putNull(field);
            return;
        }
        ObjectNode n = root.putObject(field);
        n.put("kind", Spelling.of(t.kind()));
        numbers(n.putArray("weights"), t.weights());
        number(n, "characteristicTime", t.characteristicTime());
        n.put("predictedTrials", plan.predicted(t));
    }

    private ObjectNode summary(SimulationSummary s, boolean configured) {
        SimulationConfig c = simulation.config();
        ObjectNode n = MAPPER.createObjectNode();
        n.put("rule", s.rule().cliName());
        if (configured && s.rule() != AllocationMethod.UNIFORM) {
            number(n, "beta", c.engine().beta());
        }
        n.put("stopping", Spelling.of(c.stopping().rule()));
        n.put("replications", s.replications());
        n.put("batch", c.batch());
        n.put("seed", c.seed());
        n.put("budgetTrials", c.budgetTrials());
        number(n, "meanTrials", s.meanTrials());
        number(n, "medianTrials", s.medianTrials());
        n.put("p90Trials", s.p90Trials());
        n.put("errors", s.errors());
        number(n, "errorRate", s.errorRate());
        interval(n, s);
        n.put("budgetStops", s.budgetStops());
        numbers(n.putArray("armShares"), s.armShares());
        return n;
    }

    private static void numbers(ArrayNode array, double[] values) {
        for (double v : values) {
            number(array, v);
        }
    }

    private static void number(ArrayNode array, double value) {
        if (Double.isFinite(value)) {
            array.add(value);
        } else {
            array.addNull();
        }
    }

    private static void number(ObjectNode node, String field, double value) {
        if (Double.isFinite(value)) {
            node.put(field, value);
        } else {
            node.putNull(field);
        }
    }
}
