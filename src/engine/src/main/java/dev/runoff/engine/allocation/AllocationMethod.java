package dev.runoff.engine.allocation;

import dev.runoff.engine.core.Names;
import dev.runoff.engine.posterior.Posterior;
import java.util.Arrays;
import java.util.List;
import java.util.stream.Collectors;

/** The allocation rules, each spelled on the command line as its {@link #cliName()}. */
public enum AllocationMethod {
    /** Top-two Thompson sampling in closed form ({@link TopTwo#thompson}). */
    TOP_TWO_THOMPSON(false, (posteriors, alpha, beta) -> TopTwo.thompson(alpha, beta)),
    /** Top-two probability sampling ({@link TopTwo#probability}). */
    TOP_TWO_PROBABILITY(false, (posteriors, alpha, beta) -> TopTwo.probability(alpha, beta)),
    /** Top-two value sampling ({@link TopTwo#value}). */
    TOP_TWO_VALUE(true, (posteriors, alpha, beta) -> TopTwo.value(posteriors, beta)),
    /** Top-two expected improvement ({@link TopTwo#expectedImprovement}). */
    TOP_TWO_EI(true, (posteriors, alpha, beta) -> TopTwo.expectedImprovement(posteriors, beta)),
    /** Equal weights. */
    UNIFORM(false, (posteriors, alpha, beta) -> TopTwo.uniform(posteriors.size())),
    /**
     * Top-two Thompson sampling whose leader share adapts to the pair ({@link InformationDirected}); beta is
     * ignored.
     */
    TOP_TWO_ADAPTIVE(false, (posteriors, alpha, beta) -> InformationDirected.weights(posteriors, alpha));

    private final boolean needsMeans;
    private final Formula formula;

    AllocationMethod(boolean needsMeans, Formula formula) {
        this.needsMeans = needsMeans;
        this.formula = formula;
    }

    /**
     * The rule's weights, in arm order, non-negative and summing to 1.
     *
     * @param posteriors each arm's posterior
     * @param alpha      probability that each arm is best, in the same order
     * @param beta       share of the leader, in [0, 1] (ignored by {@link #UNIFORM} and {@link #TOP_TWO_ADAPTIVE})
     */
    public double[] weights(List<? extends Posterior> posteriors, double[] alpha, double beta) {
        return formula.weights(posteriors, alpha, beta);
    }

    /**
     * Whether the weights depend on the probability that each arm is best; when they do not
     * ({@link #UNIFORM}, {@link #TOP_TWO_VALUE}, {@link #TOP_TWO_EI}) {@link #weights} ignores {@code alpha},
     * which may then be null.
     */
    public boolean readsProbabilityBest() {
        return this == TOP_TWO_THOMPSON || this == TOP_TWO_PROBABILITY || this == TOP_TWO_ADAPTIVE;
    }

    /** Whether the rule integrates over the posteriors and so needs every posterior to have a finite mean. */
    public boolean needsMeans() {
        return needsMeans;
    }

    /** The command-line spelling, e.g. {@code top-two-thompson}. */
    public String cliName() {
        return Names.kebab(this);
    }

    /**
     * The rule spelled {@code name} on the command line.
     *
     * @throws IllegalArgumentException naming the value and the valid spellings if there is none
     */
    public static AllocationMethod fromCliName(String name) {
        for (AllocationMethod r : values()) {
            if (r.cliName().equals(name)) {
                return r;
            }
        }
        throw new IllegalArgumentException("unknown rule '" + name + "', expected one of "
                + Arrays.stream(values()).map(AllocationMethod::cliName).collect(Collectors.joining(", ")));
    }

    /** The function behind a rule. */
    @FunctionalInterface
    private interface Formula {
        double[] weights(List<? extends Posterior> posteriors, double[] alpha, double beta);
    }
}
