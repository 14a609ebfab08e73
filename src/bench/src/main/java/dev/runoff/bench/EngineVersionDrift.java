package dev.runoff.bench;

import dev.runoff.decision.Evaluator;
import dev.runoff.decision.ExperimentState;
import dev.runoff.engine.EngineVersion;
import dev.runoff.engine.allocation.TopTwo;
import dev.runoff.engine.best.ExactProbabilityBest;
import dev.runoff.engine.posterior.BetaPosterior;
import dev.runoff.engine.posterior.Posterior;
import dev.runoff.records.avro.BetaParams;
import dev.runoff.records.avro.ArmState;
import dev.runoff.records.avro.DecisionRecord;
import dev.runoff.topology.TopologySettings;
import java.util.ArrayList;
import java.util.Collections;
import java.util.List;
import java.util.Locale;
import java.util.Map;
import java.util.TreeMap;

/**
 * How far one engine version's decision records move from another's on the pool of {@link RecomputeBench}
 * (Monte Carlo estimator, the job's cap on draws): the draws each used, and over every arm of every experiment
 * the absolute differences of the alphas, of the rule's weights and of the published weights (median, 99th
 * percentile, largest), how many arms won no draw (their alphas integrated), and how many decisions or
 * winners differ. Each version's rule weights are also
 * set against the weights top-two Thompson sampling gives from the exact alphas ({@link ExactProbabilityBest}
 * of the record's posteriors; the pool's rule, with no guard active), the error both estimators make.
 *
 * <p>Usage: {@code java -cp <class path> dev.runoff.bench.EngineVersionDrift [EXPERIMENTS [A [B [STOPPING_RULE
 * [MIN_TRIALS_PER_ARM]]]]]}, by default 2000 experiments, versions 1.2 and current, the GLR rule and
 * 1,000,000 minimum trials (no experiment stops); the class path as for {@link SideBySide}.
 */
public final class EngineVersionDrift {
    private EngineVersionDrift() {
    }

    /**
     * Prints the comparison.
     *
     * @param args see the class comment
     */
    public static void main(String[] args) {
        RecomputeBench bench = new RecomputeBench();
        bench.experiments = args.length > 0 ? Integer.parseInt(args[0]) : 2_000;
        bench.estimator = "SAMPLED";
        bench.engineVersion = "current";
        bench.stoppingRule = args.length > 3 ? args[3] : "GLR";
        bench.minTrialsPerArm = args.length > 4 ? Integer.parseInt(args[4]) : 1_000_000;
        bench.setUp();
        EngineVersion a = RecomputeBench.version(args.length > 1 ? args[1] : "1.2");
        EngineVersion b = RecomputeBench.version(args.length > 2 ? args[2] : "current");
        Drift drift = new Drift();
        Evaluator ea = new Evaluator(TopologySettings.MONTE_CARLO_DRAWS, a);
        Evaluator eb = new Evaluator(TopologySettings.MONTE_CARLO_DRAWS, b);
        for (ExperimentState state : bench.states()) {
            drift.add(ea.evaluate(state, RecomputeBench.NOW).decision(), eb.evaluate(state, RecomputeBench.NOW).decision());
        }
        System.out.printf(Locale.ROOT, "%d experiments, %s rule, engine %s against %s%n", bench.experiments,
                bench.stoppingRule, b.label(), a.label());
        drift.print(a.label(), b.label());
    }

    /** The differences collected over the pool. */
    private static final class Drift {
        private final Map<Integer, Integer> drawsA = new TreeMap<>();
        private final Map<Integer, Integer> drawsB = new TreeMap<>();
        private final List<Double> alpha = new ArrayList<>();
        private final List<Double> ruleWeight = new ArrayList<>();
        private final List<Double> weight = new ArrayList<>();
        private final List<Double> errorA = new ArrayList<>();
        private final List<Double> errorB = new ArrayList<>();
        private int decisions;
        private int winners;
        private int integratedA;
        private int integratedB;

        void add(DecisionRecord x, DecisionRecord y) {
            drawsA.merge(x.getDraws(), 1, Integer::sum);
            drawsB.merge(y.getDraws(), 1, Integer::sum);
            for (int i = 0; i < x.getArms().size(); i++) {
                ArmState p = x.getArms().get(i);
                ArmState q = y.getArms().get(i);
                alpha.add(Math.abs(p.getAlpha() - q.getAlpha()));
                ruleWeight.add(Math.abs(p.getWeightBeforeGuards() - q.getWeightBeforeGuards()));
                weight.add(Math.abs(p.getWeight() - q.getWeight()));
            }
            double[] exact = exactWeights(x);
            for (int i = 0; i < exact.length; i++) {
                errorA.add(Math.abs(x.getArms().get(i).getWeightBeforeGuards() - exact[i]));
                errorB.add(Math.abs(y.getArms().get(i).getWeightBeforeGuards() - exact[i]));
            }
            integratedA += integrated(x);
            integratedB += integrated(y);
            decisions += x.getDecision() == y.getDecision() ? 0 : 1;
            winners += String.valueOf(x.getWinner()).equals(String.valueOf(y.getWinner())) ? 0 : 1;
        }

        void print(String a, String b) {
            System.out.println("draws " + a + ": " + drawsA + ", mean " + mean(drawsA));
            System.out.println("draws " + b + ": " + drawsB + ", mean " + mean(drawsB));
            System.out.println("|alpha difference|        " + summary(alpha));
            System.out.println("|rule weight difference|  " + summary(ruleWeight));
            System.out.println("|weight difference|       " + summary(weight));
            System.out.println("|rule weight - exact| " + a + " " + summary(errorA));
            System.out.println("|rule weight - exact| " + b + " " + summary(errorB));
            System.out.println("arms that won no draw (integrated): " + a + " " + integratedA + ", " + b + " "
                    + integratedB);
            System.out.println("decisions differing: " + decisions + ", winners differing: " + winners);
        }

        /** Arms with standard error 0 below the leader's alpha: those that won no draw. */
        private static int integrated(DecisionRecord record) {
            double top = record.getArms().stream().mapToDouble(ArmState::getAlpha).max().orElse(1);
            return (int) record.getArms().stream().filter(a -> a.getAlphaStandardError() == 0 && a.getAlpha() < top)
                    .count();
        }

        /** Top-two Thompson weights from the exact alphas of the record's posteriors. */
        private static double[] exactWeights(DecisionRecord record) {
            List<Posterior> posteriors = new ArrayList<>();
            for (ArmState arm : record.getArms()) {
                BetaParams b = (BetaParams) arm.getPosterior();
                posteriors.add(new BetaPosterior(b.getA(), b.getB()));
            }
            double[] alpha = new ExactProbabilityBest().estimate(posteriors, 0).alpha();
            return TopTwo.thompson(alpha, record.getAllocationBeta());
        }

        private static String mean(Map<Integer, Integer> counts) {
            long sum = 0;
            long n = 0;
            for (Map.Entry<Integer, Integer> e : counts.entrySet()) {
                sum += (long) e.getKey() * e.getValue();
                n += e.getValue();
            }
            return String.format(Locale.ROOT, "%.0f", (double) sum / n);
        }

        private static String summary(List<Double> values) {
            List<Double> sorted = new ArrayList<>(values);
            Collections.sort(sorted);
            int n = sorted.size();
            return String.format(Locale.ROOT, "median %.2e, 99th percentile %.2e, largest %.2e (%d arms)",
                    sorted.get(n / 2), sorted.get((int) Math.min(n - 1, Math.floor(0.99 * n))), sorted.get(n - 1), n);
        }
    }
}
