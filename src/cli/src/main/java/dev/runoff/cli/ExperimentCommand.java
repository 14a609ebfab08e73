package dev.runoff.cli;

import dev.runoff.job.DefinitionsClient;
import dev.runoff.job.InvalidConfigException;
import dev.runoff.job.JobConfig;
import dev.runoff.records.Decoded;
import dev.runoff.records.Definitions;
import dev.runoff.records.Format;
import dev.runoff.records.RecordCodec;
import dev.runoff.records.avro.ExperimentDefinition;
import dev.runoff.records.avro.MetricKind;
import dev.runoff.records.avro.StoppingRule;
import java.io.IOException;
import java.io.PrintWriter;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Clock;
import java.time.Duration;
import java.util.List;
import java.util.Map;
import java.util.concurrent.Callable;
import org.apache.kafka.clients.producer.RecordMetadata;
import picocli.CommandLine.Command;
import picocli.CommandLine.Mixin;
import picocli.CommandLine.Model.CommandSpec;
import picocli.CommandLine.Option;
import picocli.CommandLine.Parameters;
import picocli.CommandLine.ParameterException;
import picocli.CommandLine.Spec;

/** {@code runoff experiment validate|put|list|end}: experiment definitions. */
@Command(name = "experiment", mixinStandardHelpOptions = true, description = "Manage experiment definitions.",
        subcommands = {ExperimentCommand.Validate.class, ExperimentCommand.Put.class, ExperimentCommand.ListAll.class,
            ExperimentCommand.End.class},
        exitCodeListHeading = ExitCodes.HEADING,
        exitCodeList = {"2:missing subcommand or bad arguments"})
final class ExperimentCommand implements Runnable {

    @Spec
    private CommandSpec spec;

    /** Without a subcommand there is nothing to do. */
    @Override
    public void run() {
        throw new ParameterException(spec.commandLine(), "missing subcommand: validate, put, list or end");
    }

    /**
     * Reads and checks a definition file (JSON, or Avro single-object bytes); prints every problem, each
     * naming its field, and returns {@code null} when there is any.
     */
    static ExperimentDefinition read(CommandSpec spec, Path file, Clock clock) {
        byte[] bytes;
        try {
            bytes = Files.readAllBytes(file);
        } catch (IOException e) {
            throw new ParameterException(spec.commandLine(), "cannot read " + file + ": " + e.getMessage());
        }
        Decoded<ExperimentDefinition> decoded = RecordCodec.definitions().decode(bytes, clock.millis());
        if (decoded.isValid()) {
            return decoded.orThrow();
        }
        PrintWriter err = spec.commandLine().getErr();
        decoded.problems().forEach(p -> err.println(file.getFileName() + ": " + p));
        err.println(file.getFileName() + ": invalid definition (" + decoded.problems().size() + " problem"
                + (decoded.problems().size() == 1 ? ")" : "s)"));
        err.flush();
        return null;
    }

    static String summary(ExperimentDefinition d) {
        return d.getExperimentId() + ": " + d.getArms().size() + " arms " + d.getArms() + ", "
                + d.getMetric().getKind() + " metric, " + d.getAllocation().getRule() + ", stopping "
                + d.getStopping().getRule() + " delta " + d.getStopping().getDelta();
    }

    /** Checks a definition file locally; talks to no cluster. */
    @Command(name = "validate", mixinStandardHelpOptions = true,
            description = "Check a definition file (JSON) locally; every problem names its field.",
            exitCodeListHeading = ExitCodes.HEADING,
            exitCodeList = {"0:the definition is valid", "2:an invalid definition or bad arguments"})
    static final class Validate implements Callable<Integer> {
        @Spec
        private CommandSpec spec;

        @Parameters(paramLabel = "FILE", converter = ExistingFile.class, description = "Definition file (JSON).")
        private Path file;

        Clock clock = Clock.systemUTC();

        @Override
        public Integer call() {
            ExperimentDefinition d = read(spec, file, clock);
            if (d == null) {
                return OneLineErrors.USAGE;
            }
            spec.commandLine().getOut().println("valid: " + summary(d));
            String advice = advice(d);
            if (advice != null) {
                spec.commandLine().getOut().println(advice);
            }
            spec.commandLine().getOut().flush();
            return 0;
        }
    }

    private static String plain(double value) {
        return java.math.BigDecimal.valueOf(value).stripTrailingZeros().toPlainString();
    }

    /**
     * What to know before publishing {@code d}, or {@code null}. A VALUE_PER_UNIT metric is planned with the
     * mean and standard deviation of one unit's capped sum; a value in [0, cap] has a standard deviation of at
     * most cap/2 (Popoviciu's inequality on variances, Var X <= (b - a)^2 / 4 for X in [a, b], from memory), a
     * conservative figure when nothing better is known.
     */
    static String advice(ExperimentDefinition d) {
        if (d.getMetric().getKind() != MetricKind.VALUE_PER_UNIT) {
            return null;
        }
        double cap = d.getMetric().getValueCap();
        return "note: each unit counts once, with the sum of its " + d.getMetric().getValueEvent()
                + " values within " + d.getAttributionWindowMs() + " ms of its first exposure, capped into [0, "
                + plain(cap) + "]; plan it with `plan --means M1,M2,... --stddev S`, S the standard"
                + " deviation of one unit's capped sum (at most " + plain(cap / 2) + ", half the cap)";
    }

    /** The options every cluster command shares. */
    abstract static class ClusterCommand implements Callable<Integer> {
        @Spec
        CommandSpec spec;

        @Mixin
        ClusterOptions cluster;

        @Option(names = "--timeout-ms", defaultValue = "30000", paramLabel = "MS",
                description = "How long to wait for the cluster (default: ${DEFAULT-VALUE}).")
        long timeoutMs;

        Map<String, String> env = System.getenv();

        @Override
        public Integer call() {
            Quiet.connectionWarnings();
            DefinitionsClient client;
            try {
                client = new DefinitionsClient(cluster.load(env), Duration.ofMillis(timeoutMs));
            } catch (InvalidConfigException e) {
                return ConfigProblems.print(spec, e);
            }
            try {
                int code = run(client, spec.commandLine().getOut());
                spec.commandLine().getOut().flush();
                return code;
            } catch (IllegalStateException e) {
                return ConfigProblems.failure(spec, e);
            }
        }

        abstract int run(DefinitionsClient client, PrintWriter out);
    }

    /** Validates, then publishes a definition keyed by its experiment id. */
    @Command(name = "put", mixinStandardHelpOptions = true,
            description = "Validate a definition file, then publish it (key = experimentId).",
            exitCodeListHeading = ExitCodes.HEADING,
            exitCodeList = {"0:published", "1:the cluster refused or did not answer within --timeout-ms",
                "2:an invalid definition, bad arguments or an invalid configuration"})
    static final class Put extends ClusterCommand {
        @Parameters(paramLabel = "FILE", converter = ExistingFile.class, description = "Definition file (JSON).")
        private Path file;

        @Option(names = "--format", defaultValue = "avro", paramLabel = "FORMAT", converter = Spelling.Formats.class,
                completionCandidates = Spelling.Formats.class,
                description = "Encoding on the topic: ${COMPLETION-CANDIDATES} (default: ${DEFAULT-VALUE}).")
        private Format format;

        Clock clock = Clock.systemUTC();

        @Override
        int run(DefinitionsClient client, PrintWriter out) {
            ExperimentDefinition d = read(spec, file, clock);
            if (d == null) {
                return OneLineErrors.USAGE;
            }
            RecordMetadata written = client.put(d, format);
            out.println("published " + summary(d));
            out.println("  on " + written.topic() + " partition " + written.partition() + " offset "
                    + written.offset() + "; the job assigns the version");
            return 0;
        }
    }

    /** Lists the current definitions. */
    @Command(name = "list", mixinStandardHelpOptions = true,
            description = "List the current definitions (the compacted topic read to its end) with the version"
                    + " the job accepted: 'pending' before it accepted one, '+new' when a newer submission waits.",
            exitCodeListHeading = ExitCodes.HEADING,
            exitCodeList = {"0:listed", "1:the cluster refused or did not answer within --timeout-ms",
                "2:bad arguments or an invalid configuration"})
    static final class ListAll extends ClusterCommand {
        /**
         * The format of one row of the list; the metric and stopping columns are as wide as their longest
         * symbol. Built when called, not when the command line is assembled: the record classes it reads load
         * the logging, which {@code run} must configure first.
         */
        static String row() {
            return "%-32s %-9s %-" + widest(MetricKind.values()) + "s %-" + widest(StoppingRule.values())
                    + "s %s%n";
        }

        @Override
        int run(DefinitionsClient client, PrintWriter out) {
            List<DefinitionsClient.Listed> all = client.list();
            String row = row();
            out.printf(row, "EXPERIMENT", "VERSION", "METRIC", "STOPPING", "ARMS");
            for (DefinitionsClient.Listed l : all) {
                ExperimentDefinition d = l.accepted() != null ? l.accepted() : l.submitted();
                String version = l.accepted() == null ? "pending" : l.accepted().getVersion()
                        + (Definitions.sameContent(l.submitted(), l.accepted()) ? "" : "+new");
                out.printf(row, d.getExperimentId(), version, d.getMetric().getKind(), d.getStopping().getRule(),
                        String.join(",", d.getArms()));
            }
            out.println(all.size() + (all.size() == 1 ? " experiment" : " experiments"));
            return 0;
        }

        private static int widest(Enum<?>[] symbols) {
            int width = 0;
            for (Enum<?> symbol : symbols) {
                width = Math.max(width, symbol.name().length());
            }
            return width;
        }
    }

    /** Ends an experiment with a tombstone. */
    @Command(name = "end", mixinStandardHelpOptions = true,
            description = "End an experiment: a tombstone on the definitions topic.",
            exitCodeListHeading = ExitCodes.HEADING,
            exitCodeList = {"0:ended", "1:the cluster refused or did not answer within --timeout-ms",
                "2:bad arguments or an invalid configuration"})
    static final class End extends ClusterCommand {
        @Parameters(paramLabel = "ID", description = "Experiment id.")
        private String id;

        @Override
        int run(DefinitionsClient client, PrintWriter out) {
            RecordMetadata written = client.end(id);
            out.println("ended " + id + ": tombstone on " + written.topic() + " partition " + written.partition()
                    + " offset " + written.offset() + "; the job deletes its state and its control record");
            return 0;
        }
    }
}
