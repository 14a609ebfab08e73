package dev.runoff.demo;

import com.fasterxml.jackson.core.JsonProcessingException;
import com.fasterxml.jackson.databind.ObjectMapper;
import com.fasterxml.jackson.databind.node.ArrayNode;
import com.fasterxml.jackson.databind.node.ObjectNode;
import dev.runoff.engine.planning.SimulationResult;
import dev.runoff.engine.planning.SimulationSummary;
import dev.runoff.records.avro.ArmState;
import dev.runoff.records.avro.DecisionRecord;
import dev.runoff.records.avro.GuardrailState;
import java.io.PrintWriter;
import java.nio.charset.Charset;
import java.util.List;
import java.util.Locale;

/**
 * What the demo shows: per decision, each arm's counted visitors, pending visitors (booking window still open),
 * bookings, observed rate, P(best) and weight (number and bar) with the decision; at the end, the summary. As
 * tables for a terminal, or as JSON lines ({@code "type":"period"} then one {@code "type":"summary"}) for
 * scripts.
 */
final class DemoReport {

    private static final ObjectMapper JSON = new ObjectMapper();
    private static final String[] EIGHTHS = {"", "▏", "▎", "▍", "▌", "▋", "▊", "▉"};
    private static final int BAR_WIDTH = 30;

    private final PrintWriter out;
    private final boolean blocks;
    private final boolean json;

    /**
     * @param out    where to write
     * @param json   JSON lines instead of tables
     * @param blocks whether bars may use Unicode block characters (else {@code #})
     */
    DemoReport(PrintWriter out, boolean json, boolean blocks) {
        this.out = out;
        this.json = json;
        this.blocks = blocks;
    }

    /** Whether the platform charset (standard output's on Java 17) can print the bar characters. */
    static boolean blocksPrintable() {
        return Charset.defaultCharset().newEncoder().canEncode("█▏▎▍▌▋▊▉");
    }

    /** A line of text (terminal mode only). */
    void note(String text) {
        if (!json) {
            out.println(text);
            out.flush();
        }
    }

    /** One decision: the period's table, or its JSON line. */
    void period(int period, long elapsedMs, DecisionRecord d) {
        if (json) {
            ObjectNode line = JSON.createObjectNode().put("type", "period").put("period", period)
                    .put("elapsedMs", elapsedMs).put("sequence", d.getSequence())
                    .put("decision", d.getDecision().name()).put("reason", d.getReason());
            line.put("winner", d.getWinner());
            line.put("statistic", d.getStatistic());
            line.put("threshold", d.getThreshold());
            line.put("method", d.getMethod().name()).put("draws", d.getDraws());
            ArrayNode arms = line.putArray("arms");
            for (ArmState a : d.getArms()) {
                arms.addObject().put("arm", a.getArm()).put("trials", a.getTrials()).put("pending", a.getPending())
                        .put("successes", a.getSuccesses()).put("pBest", a.getAlpha())
                        .put("pBestStandardError", a.getAlphaStandardError()).put("weight", a.getWeight())
                        .put("suspendedBy", a.getSuspendedBy());
            }
            print(line);
            return;
        }
        out.printf(Locale.ROOT, "%nperiod %d  %.1f s  %s  [%s]%n", period, elapsedMs / 1000.0, decision(d),
                estimator(d));
        out.printf(Locale.ROOT, "  %-16s %9s %8s %9s %7s %8s %6s  %s%n", "layout", "visitors", "pending", "bookings",
                "rate", "P(best)", "s.e.", "weight");
        for (ArmState a : d.getArms()) {
            long s = a.getSuccesses() == null ? 0 : a.getSuccesses();
            String rate = a.getTrials() == 0 ? "-" : String.format(Locale.ROOT, "%.2f%%", 100.0 * s / a.getTrials());
            long pending = a.getPending() == null ? 0 : a.getPending();
            out.printf(Locale.ROOT, "  %-16s %,9d %,8d %,9d %7s %8.4f %6s  %5.3f %s%n", a.getArm(), a.getTrials(),
                    pending, s, rate, a.getAlpha(), standardError(d, a), a.getWeight(), bar(a.getWeight(), blocks));
        }
        DemoGuardrails.lines(d).forEach(line -> out.println("  " + line));
        out.flush();
    }

    /** The closing summary. */
    void summary(DemoSummary s, DemoOptions o) {
        if (json) {
            print(summaryJson(s, o));
            return;
        }
        DecisionRecord last = s.last();
        out.println();
        if (s.stopped()) {
            out.printf(Locale.ROOT, "STOP after %d decisions (%.1f s): winner %s (%s; the hidden best layout is %s)%n",
                    s.periods(), s.elapsedMs() / 1000.0, s.winner(), s.winner().equals(s.trueBest()) ? "correct"
                            : "WRONG", s.trueBest());
            out.printf(Locale.ROOT, "  confidence: %s; P(best) of %s = %.4f%n", rule(last), s.winner(),
                    s.winnerProbability());
        } else {
            out.printf(Locale.ROOT, "no STOP within %d ms (%d decisions); the hidden best layout is %s%n",
                    o.maxMs(), s.periods(), s.trueBest());
        }
        out.printf(Locale.ROOT, "  traffic spent: %,d visitors counted at the last decision (%,d sent)%s%n", s.trials(),
                s.visitorsSent(), s.stopped() ? String.format(Locale.ROOT, ", %,d (%.0f%%) of them on %s",
                        s.winnerTrials(), 100.0 * s.winnerTrials() / Math.max(1, s.trials()), s.winner()) : "");
        List<String> suspensions = DemoGuardrails.lines(last);
        out.println(suspensions.isEmpty() ? "  guardrails: no layout suspended"
                : "  guardrails: " + String.join("; ", suspensions));
        traffic(s);
        simulated(s, o);
        out.printf(Locale.ROOT, "  asymptotic leading term T*(w) log(1/delta) (Garivier & Kaufmann 2016; below what a"
                + " finite delta needs): uniform %,.0f; optimal %,.0f; top-two target (beta 1/2) %,.0f%n",
                s.predictedUniform(), s.predictedOptimal(), s.predictedTopTwo());
        out.printf(Locale.ROOT, "  audit: %d decision records on topic %s (hash chain %s)%s%n", s.periods(),
                s.decisionsTopic(), s.chainIntact() ? "verified" : "BROKEN", s.exported() == null
                        ? "; the demo broker is deleted at exit (--export-decisions FILE keeps them)"
                        : ", exported to " + s.exported());
        out.flush();
    }

    /** Who came, who came back and what they saw, and what the last decision did not know yet. */
    private void traffic(DemoSummary s) {
        DemoSummary.Traffic t = s.traffic();
        out.printf(Locale.ROOT, "  visitors: %,d in %,d visits; %,d returning visits (%.0f%%); returning visitors shown"
                + " another layout than before while theirs had weight: %,d (the sticky assigner kept %,d on a layout"
                + " the current weights alone would have changed)%n", t.visitors(), t.visits(), t.returningVisits(),
                100.0 * t.returningVisits() / Math.max(1, t.visits()), t.switchedWhileWeighted(), t.keptPicks());
        out.printf(Locale.ROOT, "  bookings: %,d sent, after delays; visitors still pending at the %s (booking window"
                + " of %d ms open, not yet counted): %,d%n", t.bookingsSent(), s.stopped() ? "STOP" : "last decision",
                DemoScenario.CONVERSION_WINDOW_MS, s.pendingAtLast());
    }

    /** The planner simulation's visitors to STOP, beside this run's. */
    private void simulated(DemoSummary s, DemoOptions o) {
        SimulationResult sim = s.simulated();
        if (sim == null) {
            out.printf(Locale.ROOT, "  planner simulation: not ready %d s after the end; no simulated comparison%n",
                    Demo.SIMULATION_PATIENCE.toSeconds());
            return;
        }
        SimulationSummary rule = sim.rule();
        SimulationSummary uniform = sim.baseline();
        out.printf(Locale.ROOT, "  simulated visitors to STOP for these hidden rates at delta %s (planner simulation, %d"
                + " runs; same rule, GLR threshold, warm-up, %,d new visitors per evaluation):%n", o.delta(),
                rule.replications(), o.newVisitorsPerPeriod());
        out.printf(Locale.ROOT, "    %s: median %,.0f (mean %,.0f); uniform split: median %,.0f (mean %,.0f);"
                + " uniform / %s = %.2fx (medians)%n", rule.rule(), rule.medianTrials(), rule.meanTrials(),
                uniform.medianTrials(), uniform.meanTrials(), rule.rule(), medianRatio(sim));
        out.printf(Locale.ROOT, "    this run: %,d visitors; simulated runs ended on the budget: %d (%s), %d (uniform)%n",
                s.trials(), rule.budgetStops(), rule.rule(), uniform.budgetStops());
    }

    /** Median trials to STOP of the uniform split over those of the demo's rule. */
    private static double medianRatio(SimulationResult sim) {
        return sim.baseline().medianTrials() / sim.rule().medianTrials();
    }

    private ObjectNode summaryJson(DemoSummary s, DemoOptions o) {
        ObjectNode line = JSON.createObjectNode().put("type", "summary").put("stopped", s.stopped());
        line.put("winner", s.winner());
        line.put("trueBest", s.trueBest()).put("correct", s.stopped() && s.winner().equals(s.trueBest()));
        line.put("reason", s.last() == null ? null : s.last().getReason());
        line.put("winnerPBest", s.stopped() ? s.winnerProbability() : null);
        line.put("statistic", s.last() == null ? null : s.last().getStatistic());
        line.put("threshold", s.last() == null ? null : s.last().getThreshold());
        line.put("winnerTrials", s.stopped() ? s.winnerTrials() : null);
        ArrayNode suspended = line.putArray("suspended");
        for (ArmState a : DemoGuardrails.suspended(s.last())) {
            GuardrailState g = DemoGuardrails.failed(a);
            suspended.addObject().put("arm", a.getArm()).put("guardrail", a.getSuspendedBy())
                    .put("statistic", g.getStatistic()).put("threshold", g.getThreshold());
        }
        line.put("decisions", s.periods()).put("elapsedMs", s.elapsedMs()).put("trials", s.trials())
                .put("visitorsSent", s.visitorsSent()).put("delta", o.delta()).put("seed", o.seed());
        DemoSummary.Traffic t = s.traffic();
        line.put("visits", t.visits()).put("returningVisits", t.returningVisits())
                .put("switchedWhileWeighted", t.switchedWhileWeighted()).put("keptPicks", t.keptPicks())
                .put("bookingsSent", t.bookingsSent())
                .put("pendingAtLast", s.pendingAtLast());
        ObjectNode predicted = line.putObject("predictedTrials");
        predicted.put("uniform", s.predictedUniform()).put("optimal", s.predictedOptimal())
                .put("topTwoBetaHalf", s.predictedTopTwo());
        simulatedJson(line, s.simulated());
        ArrayNode rates = line.putArray("hiddenRates");
        List<String> arms = s.arms();
        double[] r = s.rates();
        for (int i = 0; i < arms.size(); i++) {
            rates.addObject().put("arm", arms.get(i)).put("rate", r[i]);
        }
        line.put("decisionsTopic", s.decisionsTopic()).put("chainIntact", s.chainIntact());
        line.put("exported", s.exported() == null ? null : s.exported().toString());
        return line;
    }

    private static void simulatedJson(ObjectNode line, SimulationResult sim) {
        if (sim == null) {
            line.putNull("simulated");
            return;
        }
        ObjectNode simulated = line.putObject("simulated");
        simulated.put("replications", sim.rule().replications()).put("rule", sim.rule().rule().name());
        for (SimulationSummary summary : List.of(sim.rule(), sim.baseline())) {
            simulated.putObject(summary == sim.rule() ? "ruleTrials" : "uniformTrials")
                    .put("median", summary.medianTrials()).put("mean", summary.meanTrials())
                    .put("budgetStops", summary.budgetStops()).put("errors", summary.errors());
        }
        simulated.put("uniformOverRuleMedian", medianRatio(sim));
    }

    /** How P(best) was computed: {@code Monte Carlo, 20,000 draws} or {@code exact}. */
    private static String estimator(DecisionRecord d) {
        return d.getDraws() == 0 ? "P(best) exact" : String.format(Locale.ROOT, "P(best) by Monte Carlo, %,d draws",
                d.getDraws());
    }

    /** The standard error of P(best), {@code 0.0049}; {@code -} for exact integration. */
    private static String standardError(DecisionRecord d, ArmState a) {
        return d.getDraws() == 0 ? "-" : String.format(Locale.ROOT, "%.4f", a.getAlphaStandardError());
    }

    private static String decision(DecisionRecord d) {
        String head = "STOP".equals(d.getDecision().name()) ? "decision STOP, winner " + d.getWinner()
                : "decision CONTINUE";
        return head + " (" + d.getReason() + (d.getStatistic() == null ? "" : "; " + rule(d)) + ")";
    }

    private static String rule(DecisionRecord d) {
        if (d.getStatistic() == null) {
            return d.getStoppingRule() + " not evaluated (" + d.getReason() + ")";
        }
        String cmp = d.getStatistic() >= d.getThreshold() ? ">=" : "<";
        return String.format(Locale.ROOT, "%s statistic %.2f %s threshold %.2f at delta %s", d.getStoppingRule(),
                d.getStatistic(), cmp, d.getThreshold(), d.getDelta());
    }

    /** A bar of {@code weight * 30} cells: eighth blocks, or {@code #} per whole cell without {@code blocks}. */
    static String bar(double weight, boolean blocks) {
        int eighths = (int) Math.round(Math.max(0, Math.min(1, weight)) * BAR_WIDTH * 8);
        return blocks ? "█".repeat(eighths / 8) + EIGHTHS[eighths % 8] : "#".repeat((eighths + 4) / 8);
    }

    private void print(ObjectNode line) {
        try {
            out.println(JSON.writeValueAsString(line));
            out.flush();
        } catch (JsonProcessingException e) {
            throw new IllegalStateException("cannot write JSON", e);
        }
    }
}
