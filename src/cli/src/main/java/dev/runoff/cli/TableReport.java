package dev.runoff.cli;

import dev.runoff.engine.core.Arm;
import dev.runoff.engine.EngineConfig;
import dev.runoff.engine.Evaluation;
import dev.runoff.engine.core.Metric;
import dev.runoff.engine.allocation.GuardFlag;
import dev.runoff.engine.best.AdaptiveMonteCarlo;
import dev.runoff.engine.best.ProbabilityBest;
import dev.runoff.engine.stats.BernoulliStats;
import dev.runoff.engine.stats.ValueStats;
import java.util.ArrayList;
import java.util.List;
import java.util.Locale;
import java.util.stream.Collectors;

/** The default output of {@code evaluate}: a heading and one aligned row per arm, with a bar per weight. */
final class TableReport {
    /** Bar length, in characters, of a weight of 1. */
    static final int BAR_WIDTH = 40;
    private static final String EIGHTHS = " ▏▎▍▌▋▊▉";
    private static final String FULL = "█";

    private TableReport() {
    }

    static String render(List<Arm> arms, EngineConfig config, Evaluation e) {
        StringBuilder out = new StringBuilder();
        out.append(String.format(Locale.ROOT, "%d arms, %s metric, prior %s%n", arms.size(),
                Spelling.of(config.metric()), Posteriors.describe(config.prior())));
        out.append(String.format(Locale.ROOT, "P(best) by %s; rule %s, beta %s; seed %d; engine %s%n",
                method(e.probabilityBest()), e.rule().cliName(), Posteriors.number(e.beta()), e.seed(),
                e.engineVersion()));
        boolean guarded = !e.flags().isEmpty();
        if (guarded) {
            out.append("guards active: ").append(e.flags().stream().map(Spelling::of)
                    .collect(Collectors.joining(", "))).append(System.lineSeparator());
        }
        out.append(System.lineSeparator());
        List<String[]> rows = new ArrayList<>();
        rows.add(header(config.metric(), guarded));
        for (int i = 0; i < arms.size(); i++) {
            rows.add(row(arms.get(i), e, i, guarded));
        }
        appendAligned(out, rows, e.weights());
        appendZeroWinNote(out, arms, e.probabilityBest());
        return out.toString();
    }

    /**
     * For arms that won none of the Monte Carlo draws: the one-sided 95% Clopper-Pearson bound their count
     * alone gives, and that the P(best) shown is their conditional estimate.
     */
    private static void appendZeroWinNote(StringBuilder out, List<Arm> arms, ProbabilityBest pb) {
        List<String> names = new ArrayList<>();
        for (int i = 0; i < arms.size(); i++) {
            if (pb.conditional(i)) {
                names.add(arms.get(i).name());
            }
        }
        if (!names.isEmpty()) {
            out.append(String.format(Locale.ROOT, "%s won none of %d draws: P(best) < %.1e by the count alone (one-sided"
                    + " 95%% Clopper-Pearson); shown: the conditional estimate, integrated%n", String.join(", ", names),
                    pb.draws(), AdaptiveMonteCarlo.zeroWinUpperBound(pb.draws())));
        }
    }

    private static String method(ProbabilityBest pb) {
        return pb.method() == ProbabilityBest.Method.EXACT ? "exact integration"
                : "Monte Carlo, " + pb.draws() + " draws";
    }

    private static String[] header(Metric metric, boolean guarded) {
        List<String> h = new ArrayList<>(List.of("arm", "trials", metric == Metric.BERNOULLI ? "rate" : "mean",
                "posterior mean", "95% interval", "P(best)", "std. error"));
        if (guarded) {
            h.add("rule weight");
        }
        h.add("weight");
        return h.toArray(String[]::new);
    }

    private static String[] row(Arm arm, Evaluation e, int i, boolean guarded) {
        Evaluation.PosteriorSummary s = e.posteriors().get(i);
        List<String> r = new ArrayList<>();
        r.add(arm.name());
        r.add(Long.toString(arm.stats().trials()));
        r.add(fixed(arm.stats() instanceof BernoulliStats b ? b.rate() : ((ValueStats) arm.stats()).mean()));
        r.add(fixed(s.mean()));
        r.add("[" + fixed(s.lower95()) + ", " + fixed(s.upper95()) + "]");
        r.add(probability(e.probabilityBest().alpha(i)));
        r.add(probability(e.probabilityBest().standardError(i)));
        if (guarded) {
            r.add(fixed(e.ruleWeights()[i]));
        }
        r.add(fixed(e.weight(i)));
        return r.toArray(String[]::new);
    }

    private static void appendAligned(StringBuilder out, List<String[]> rows, double[] weights) {
        int columns = rows.get(0).length;
        int[] width = new int[columns];
        for (String[] r : rows) {
            for (int c = 0; c < columns; c++) {
                width[c] = Math.max(width[c], r[c].length());
            }
        }
        for (int k = 0; k < rows.size(); k++) {
            StringBuilder line = new StringBuilder();
            String[] r = rows.get(k);
            for (int c = 0; c < columns; c++) {
                String pad = " ".repeat(width[c] - r[c].length());
                line.append(c == 0 ? r[c] + pad : "  " + pad + r[c]);
            }
            if (k > 0) {
                line.append("  ").append(bar(weights[k - 1]));
            }
            out.append(line.toString().stripTrailing()).append(System.lineSeparator());
        }
    }

    /** A bar of block characters, {@link #BAR_WIDTH} characters for a weight of 1, in eighths of a character. */
    static String bar(double weight) {
        long eighths = Math.round(weight * BAR_WIDTH * 8);
        return FULL.repeat((int) (eighths / 8)) + EIGHTHS.charAt((int) (eighths % 8));
    }

    private static String fixed(double x) {
        return Double.isFinite(x) ? String.format(Locale.ROOT, "%.4f", x) : "n/a";
    }

    /** Four decimals, or scientific notation for values too small to show that way. */
    private static String probability(double p) {
        return p > 0 && p < 5e-5 ? String.format(Locale.ROOT, "%.1e", p) : fixed(p);
    }
}
