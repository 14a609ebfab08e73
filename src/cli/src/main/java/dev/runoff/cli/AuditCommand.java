package dev.runoff.cli;

import dev.runoff.audit.DecisionSource;
import dev.runoff.audit.Entry;
import dev.runoff.audit.EntryDecoder;
import dev.runoff.audit.ExperimentAudit;
import dev.runoff.audit.FileSource;
import dev.runoff.audit.EvidenceChart;
import dev.runoff.audit.EvidenceView;
import dev.runoff.audit.SvgChart;
import dev.runoff.audit.Timeline;
import dev.runoff.audit.TimelineWriter;
import dev.runoff.audit.TopicSource;
import dev.runoff.audit.Verifier;
import dev.runoff.records.SignatureVerifier;
import dev.runoff.records.avro.DecisionRecord;
import dev.runoff.audit.VerifyReport;
import java.io.IOException;
import java.io.InputStream;
import java.io.PrintWriter;
import java.io.UncheckedIOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Clock;
import java.time.Duration;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.Properties;
import java.util.concurrent.Callable;
import picocli.CommandLine.Command;
import picocli.CommandLine.Mixin;
import picocli.CommandLine.Model.CommandSpec;
import picocli.CommandLine.Option;
import picocli.CommandLine.ParameterException;
import picocli.CommandLine.Spec;

/**
 * {@code runoff audit}: {@code verify} checks decision records (hash chain, sequence, recomputation, stopping
 * rule, sample ratio); {@code report} prints one experiment's timeline and draws its chart. Records come from
 * the decisions topic or from an exported JSON-lines file. Exit codes of verify: 0 when everything verifies,
 * 1 when something fails, 2 for bad arguments. {@code --client-config} takes plain Kafka client properties
 * (not the job's configuration, which is what {@code --config} means in the other commands).
 */
@Command(name = "audit", mixinStandardHelpOptions = true, versionProvider = VersionInfo.class,
        description = "Verify and report decision records from the decisions topic or an exported file.",
        subcommands = {AuditCommand.Verify.class, AuditCommand.Report.class},
        exitCodeListHeading = ExitCodes.HEADING,
        exitCodeList = {"2:missing subcommand or bad arguments"})
final class AuditCommand implements Runnable {

    @Spec
    private CommandSpec spec;

    /** Without a subcommand there is nothing to do: a usage error. */
    @Override
    public void run() {
        throw new ParameterException(spec.commandLine(), "missing command: verify or report");
    }

    /** Where the records come from: {@code --file}, or {@code --bootstrap-server} and {@code --topic}. */
    static final class SourceOptions {

        @Spec(Spec.Target.MIXEE)
        private CommandSpec spec;

        @Option(names = "--file", paramLabel = "FILE", converter = ExistingFile.class,
                description = "Exported JSON-lines file: one canonical JSON decision record per line.")
        private Path file;

        @Option(names = "--bootstrap-server", paramLabel = "HOST:PORT",
                description = "Kafka bootstrap servers to read the decisions topic from.")
        private String bootstrapServer;

        @Option(names = "--topic", paramLabel = "TOPIC", defaultValue = "runoff.decisions",
                description = "Decisions topic (default: ${DEFAULT-VALUE}).")
        private String topic;

        @Option(names = "--client-config", paramLabel = "FILE", converter = ExistingFile.class,
                description = "Plain Kafka client properties (bootstrap.servers, security.protocol, sasl.*, ssl.*,"
                        + " ...) for reading the topic; not the job's configuration file.")
        private Path clientConfig;

        @Option(names = "--timeout-ms", paramLabel = "MS", defaultValue = "30000",
                description = "Give up reading the topic after this many milliseconds without progress"
                        + " (default: ${DEFAULT-VALUE}).")
        private long timeoutMs;

        @Option(names = "--experiment", paramLabel = "ID", description = "Only this experiment's records.")
        String experiment;

        /** The records chosen by the options. */
        List<Entry> read() {
            EntryDecoder decoder = new EntryDecoder(Clock.systemUTC().millis());
            return source(decoder).read(experiment);
        }

        private DecisionSource source(EntryDecoder decoder) {
            Map<String, String> client = clientConfig == null ? new LinkedHashMap<>() : load(clientConfig);
            if (bootstrapServer != null) {
                client.put("bootstrap.servers", bootstrapServer);
            }
            boolean topicGiven = client.containsKey("bootstrap.servers");
            if ((file == null) == !topicGiven) {
                throw new ParameterException(spec.commandLine(), file == null
                        ? "give --file FILE or --bootstrap-server HOST:PORT (or bootstrap.servers in --client-config)"
                        : "give either --file or a bootstrap server, not both");
            }
            if (file != null) {
                return new FileSource(file, decoder);
            }
            if (timeoutMs <= 0) {
                throw new ParameterException(spec.commandLine(), "--timeout-ms must be > 0, got " + timeoutMs);
            }
            Quiet.connectionWarnings();
            return new TopicSource(client, topic, Duration.ofMillis(timeoutMs), decoder);
        }

        private Map<String, String> load(Path path) {
            Properties properties = new Properties();
            try (InputStream in = Files.newInputStream(path)) {
                properties.load(in);
            } catch (IOException e) {
                throw new ParameterException(spec.commandLine(), "--client-config " + path + ": " + e.getMessage(), e);
            }
            Map<String, String> map = new LinkedHashMap<>();
            properties.stringPropertyNames().forEach(k -> map.put(k, properties.getProperty(k)));
            return map;
        }
    }

    /** {@code runoff audit verify}. */
    @Command(name = "verify", mixinStandardHelpOptions = true, versionProvider = VersionInfo.class,
            description = "Check decision records: hash chain, sequence numbers, recomputation by the engine,"
                    + " the stopping rule, that exposures followed the published weights (sample ratio), and with"
                    + " --public-key who signed them.",
            exitCodeListHeading = ExitCodes.HEADING,
            exitCodeList = {"0:everything verifies", "1:something fails to verify", "2:bad arguments"})
    static final class Verify implements Callable<Integer> {

        @Spec
        private CommandSpec spec;

        @Mixin
        private SourceOptions source;

        @Option(names = "--alpha", paramLabel = "A", defaultValue = "0.001",
                description = "Significance level of the sample-ratio test, for each experiment as a whole (Holm's"
                        + " procedure across its periods) (default: ${DEFAULT-VALUE}).")
        private double alpha;

        @Option(names = "--json", description = "Print the result as JSON.")
        private boolean json;

        @Option(names = "--public-key", paramLabel = "[ID=]PEM",
                description = "Ed25519 public key (PEM) the records may be signed with; repeat it for every key in"
                        + " use since the first record (rotation). The key id is the file's 'Key-Id:' line, or ID."
                        + " Without it, authorship is not checked.")
        private List<String> publicKeys = List.of();

        @Option(names = "--last-hash", paramLabel = "EXPERIMENT=HASH",
                description = "Hash of an experiment's latest record, kept apart from the topic (repeatable): fails"
                        + " when no record has it, i.e. when records were cut off the end of the chain.")
        private java.util.Map<String, String> lastHashes = java.util.Map.of();

        @Option(names = "--cross-check", description = "Also integrate every Monte Carlo probability of being best"
                + " exactly and report each one more than --cross-check-sigmas standard errors away (check"
                + " 'cross-check'; the recorded decision is not changed).")
        private boolean crossCheck;

        @Option(names = "--cross-check-sigmas", paramLabel = "K", defaultValue = "5",
                description = "Standard errors a Monte Carlo estimate may lie from the exact value under"
                        + " --cross-check (default: ${DEFAULT-VALUE}).")
        private double crossCheckSigmas;

        @Override
        public Integer call() {
            Verifier verifier;
            SignatureVerifier keys = PublicKeyFiles.read(spec, publicKeys);
            try {
                verifier = new Verifier(alpha, keys, lastHashes);
            } catch (IllegalArgumentException e) {
                throw new ParameterException(spec.commandLine(), "--alpha: " + e.getMessage(), e);
            }
            try {
                verifier = crossCheck ? verifier.withCrossCheck(crossCheckSigmas) : verifier;
            } catch (IllegalArgumentException e) {
                throw new ParameterException(spec.commandLine(), "--cross-check-sigmas: " + e.getMessage(), e);
            }
            List<ExperimentAudit> audits = verifier.verify(source.read());
            PrintWriter out = spec.commandLine().getOut();
            java.util.Set<String> ids = keys == null ? null : keys.keyIds();
            out.print(json ? VerifyReport.json(audits, alpha, ids) : VerifyReport.text(audits, alpha, ids));
            out.flush();
            return VerifyReport.passed(audits) ? 0 : 1;
        }
    }

    /** {@code runoff audit report}. */
    @Command(name = "report", mixinStandardHelpOptions = true, versionProvider = VersionInfo.class,
            description = "Print one experiment's decisions over time as text, CSV or JSON, and draw them as SVG.",
            exitCodeListHeading = ExitCodes.HEADING,
            exitCodeList = {"0:printed", "1:an output file cannot be written, or an internal error", "2:bad arguments"})
    static final class Report implements Callable<Integer> {

        @Spec
        private CommandSpec spec;

        @Mixin
        private SourceOptions source;

        @Option(names = "--format", paramLabel = "FORMAT", defaultValue = "text",
                description = "text, csv or json (default: ${DEFAULT-VALUE}).")
        private String format;

        @Option(names = "--output", paramLabel = "FILE", description = "Write the table here instead of stdout.")
        private Path output;

        @Option(names = "--svg", paramLabel = "FILE",
                description = "Also write the chart (weights and P(best) over time) as an SVG file.")
        private Path svg;

        @Option(names = "--evidence-svg", paramLabel = "FILE",
                description = "Also write the evidence chart (-ln P(best) of each losing arm against trials, with the"
                        + " predicted rates as reference slopes) as an SVG file.")
        private Path evidenceSvg;

        @Override
        public Integer call() {
            if (!List.of("text", "csv", "json").contains(format)) {
                throw new ParameterException(spec.commandLine(), "--format must be text, csv or json, got " + format);
            }
            List<Entry> entries = source.read();
            String experiment = experiment(entries);
            List<Entry> mine = entries.stream().filter(e -> experiment.equals(e.experimentId())).toList();
            long invalid = mine.stream().filter(e -> !e.isValid()).count();
            List<DecisionRecord> records = mine.stream().filter(Entry::isValid).map(Entry::record).toList();
            Timeline timeline = Timeline.of(experiment, records);
            EvidenceView evidence = EvidenceView.of(records);
            String table = switch (format) {
                case "csv" -> TimelineWriter.csv(timeline, evidence);
                case "json" -> TimelineWriter.json(timeline, evidence);
                default -> TimelineWriter.text(timeline, evidence);
            };
            write(output, table);
            if (svg != null) {
                write(svg, SvgChart.of(timeline));
            }
            if (evidenceSvg != null) {
                write(evidenceSvg, EvidenceChart.of(timeline, evidence));
            }
            if (invalid > 0) {
                PrintWriter err = spec.commandLine().getErr();
                err.println("audit report: " + invalid + " invalid record(s) left out; run 'java -jar target/runoff.jar audit verify'");
                err.flush();
            }
            return 0;
        }

        /** The experiment asked for, or the only one present. */
        private String experiment(List<Entry> entries) {
            if (source.experiment != null) {
                if (entries.stream().noneMatch(e -> source.experiment.equals(e.experimentId()) && e.isValid())) {
                    throw new ParameterException(spec.commandLine(), "no valid decision records for experiment '"
                            + source.experiment + "'");
                }
                return source.experiment;
            }
            List<String> ids = entries.stream().filter(Entry::isValid).map(Entry::experimentId).distinct().toList();
            if (ids.size() != 1) {
                throw new ParameterException(spec.commandLine(), ids.isEmpty() ? "no valid decision records found"
                        : "the records hold " + ids.size() + " experiments: choose one with --experiment " + ids);
            }
            return ids.get(0);
        }

        private void write(Path path, String text) {
            if (path == null) {
                PrintWriter out = spec.commandLine().getOut();
                out.print(text);
                out.flush();
                return;
            }
            try {
                Files.writeString(path, text, StandardCharsets.UTF_8);
            } catch (IOException e) {
                throw new UncheckedIOException("cannot write " + path + ": " + e.getMessage(), e);
            }
        }
    }
}
