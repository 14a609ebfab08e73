package dev.runoff.cli;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.IOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.Locale;
import java.util.stream.Stream;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.MethodSource;
import picocli.CommandLine;
import picocli.CommandLine.Model.ArgSpec;
import picocli.CommandLine.Model.OptionSpec;

/** One style across the whole command tree: labels, help text, exit codes, option names, file errors. */
class CommandLineConventionsTest {

    @TempDir
    Path dir;

    /** Every command of the tree, the root included. */
    static List<CommandLine> commands() {
        List<CommandLine> all = new ArrayList<>();
        collect(Main.commandLine(), all);
        return all;
    }

    private static void collect(CommandLine c, List<CommandLine> all) {
        all.add(c);
        c.getSubcommands().values().stream().distinct().forEach(s -> collect(s, all));
    }

    private static String name(CommandLine c) {
        return c.getCommandSpec().qualifiedName();
    }

    private static Stream<ArgSpec> argsTakingValues(CommandLine c) {
        return c.getCommandSpec().args().stream().filter(a -> a.arity().max() > 0 && !a.hidden());
    }

    @Test
    void theTreeHoldsEveryCommand() {
        List<String> names = commands().stream().map(CommandLineConventionsTest::name).toList();
        for (String expected : List.of("runoff", "runoff evaluate", "runoff demo", "runoff run", "runoff topics create",
                "runoff experiment put", "runoff plan", "runoff audit verify", "runoff audit report")) {
            assertTrue(names.contains(expected), expected + " in " + names);
        }
    }

    @Test
    void everyParameterLabelIsUpperCase() {
        List<String> lowerCase = new ArrayList<>();
        for (CommandLine c : commands()) {
            argsTakingValues(c).forEach(a -> {
                if (!a.paramLabel().equals(a.paramLabel().toUpperCase(Locale.ROOT))) {
                    lowerCase.add(name(c) + " " + (a instanceof OptionSpec o ? o.longestName() : "") + " "
                            + a.paramLabel());
                }
            });
        }
        assertEquals(List.of(), lowerCase);
    }

    @Test
    void everyUsageShowsOnlyUpperCaseLabels() {
        for (CommandLine c : commands()) {
            String usage = c.getUsageMessage(CommandLine.Help.Ansi.OFF);
            assertFalse(usage.matches("(?s).*<[a-z][A-Za-z]*>.*"), name(c) + " has a default lower-case label:\n"
                    + usage);
        }
    }

    @Test
    void everyCommandsHelpStatesItsExitCodesIncludingTheUsageError() {
        for (CommandLine c : commands()) {
            String usage = c.getUsageMessage(CommandLine.Help.Ansi.OFF);
            assertTrue(usage.contains("Exit codes:"), name(c) + ":\n" + usage);
            assertTrue(usage.lines().anyMatch(l -> l.trim().startsWith("2 ")), name(c) + ":\n" + usage);
            assertFalse(c.getCommandSpec().usageMessage().exitCodeList().isEmpty(), name(c));
        }
    }

    @Test
    void theDemoHelpStatesTheInterruptedExitCode() {
        String usage = Main.commandLine().getSubcommands().get("demo").getUsageMessage(CommandLine.Help.Ansi.OFF);
        assertTrue(usage.lines().anyMatch(l -> l.trim().startsWith("130 ")), usage);
    }

    @Test
    void helpSentencesHaveNoHardLineBreaks() {
        for (CommandLine c : commands()) {
            assertTrue(c.getCommandSpec().usageMessage().description().length <= 1,
                    name(c) + " description is split into lines");
            argsTakingValues(c).forEach(a -> assertTrue(a.description().length <= 1, name(c) + " " + a));
            c.getCommandSpec().options().forEach(o -> assertTrue(o.description().length <= 1, name(c) + " "
                    + o.longestName() + " description is split into lines"));
        }
    }

    @Test
    void timeOptionsCarryTheirUnitAsAMillisecondSuffix() {
        for (CommandLine c : commands()) {
            for (OptionSpec o : c.getCommandSpec().options()) {
                String n = o.longestName();
                assertFalse(n.endsWith("-seconds") || n.equals("--timeout") || n.endsWith("-secs"), name(c) + " " + n);
                if (o.paramLabel().equals("MS") || o.paramLabel().equals("SECONDS")) {
                    assertTrue(n.endsWith("-ms"), name(c) + " " + n);
                }
            }
        }
    }

    @Test
    void formatValuesAreLowerCaseEverywhere() {
        int seen = 0;
        for (CommandLine c : commands()) {
            OptionSpec format = c.getCommandSpec().findOption("--format");
            if (format == null) {
                continue;
            }
            seen++;
            String d = format.defaultValue();
            assertEquals(d.toLowerCase(Locale.ROOT), d, name(c));
            if (format.completionCandidates() != null) {
                format.completionCandidates().forEach(v -> assertEquals(v.toLowerCase(Locale.ROOT), v, name(c)));
            }
        }
        assertEquals(2, seen);
    }

    @Test
    void configMeansTheJobsConfigurationInEveryCommand() {
        int seen = 0;
        for (CommandLine c : commands()) {
            OptionSpec config = c.getCommandSpec().findOption("--config");
            if (config != null) {
                seen++;
                assertTrue(config.description()[0].startsWith("Job configuration file"), name(c) + ": "
                        + config.description()[0]);
            }
        }
        assertTrue(seen >= 5, "commands with --config: " + seen);
        OptionSpec client = Main.commandLine().getSubcommands().get("audit").getSubcommands().get("verify")
                .getCommandSpec().findOption("--client-config");
        assertTrue(client.description()[0].contains("not the job's configuration"), client.description()[0]);
    }

    /** Each command with its file-reading option, the path appended. */
    static Stream<List<String>> fileReaders() {
        return Stream.of(
                List.of("run", "--config"),
                List.of("topics", "create", "--config"),
                List.of("experiment", "list", "--config"),
                List.of("experiment", "validate"),
                List.of("experiment", "put"),
                List.of("audit", "verify", "--file"),
                List.of("audit", "report", "--file"),
                List.of("audit", "verify", "--bootstrap-server", "127.0.0.1:9", "--client-config"));
    }

    @ParameterizedTest
    @MethodSource("fileReaders")
    void aMissingFileSaysNoSuchFile(List<String> command) {
        Path missing = dir.resolve("absent.json");
        CliRun r = run(command, missing);
        assertEquals(2, r.exitCode(), r.err());
        assertTrue(r.err().contains("no such file: " + missing), r.err());
        assertEquals(1, r.err().lines().count(), r.err());
    }

    @ParameterizedTest
    @MethodSource("fileReaders")
    void aDirectoryGivenForAFileSaysIsADirectory(List<String> command) throws IOException {
        Path folder = Files.createDirectories(dir.resolve("folder"));
        CliRun r = run(command, folder);
        assertEquals(2, r.exitCode(), r.err());
        assertTrue(r.err().contains("is a directory: " + folder), r.err());
        assertEquals(1, r.err().lines().count(), r.err());
    }

    private static CliRun run(List<String> command, Path path) {
        List<String> args = new ArrayList<>(command);
        args.add(path.toString());
        return CliRun.of(args.toArray(String[]::new));
    }
}
