package dev.runoff.cli;

import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import com.fasterxml.jackson.core.JsonProcessingException;
import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;
import dev.runoff.records.Decoded;
import dev.runoff.records.RecordCodec;
import dev.runoff.testkit.RepositoryFiles;
import java.io.IOException;
import java.io.UncheckedIOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.Locale;
import java.util.regex.Matcher;
import java.util.regex.Pattern;
import java.util.stream.Stream;
import org.apache.avro.specific.SpecificRecord;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;

/**
 * Keeps the examples of README.md and src/docs/*.md from going stale: every fenced block marked {@code json}
 * must parse, and every one that is a record of the topics must pass the job's own decoding and validation
 * ({@link RecordCodec}), at the current time.
 *
 * <p>A block's type is the marker comment on the nearest non-blank line above its fence,
 * {@code <!-- example: definition|outcome-event|control-record|decision-record|json -->} ({@code json}: a
 * plain snippet, only parsed), or else is read from its content (a field only that record type has). A
 * {@code json} block of no known type fails the test.
 */
class DocumentationExamplesTest {

    /** What a {@code json} block of the docs is. */
    enum Kind {
        DEFINITION("definition"), OUTCOME_EVENT("outcome-event"), CONTROL_RECORD("control-record"),
        DECISION_RECORD("decision-record"), PLAIN_JSON("json");

        final String marker;

        Kind(String marker) {
            this.marker = marker;
        }

        static Kind ofMarker(String marker) {
            for (Kind kind : values()) {
                if (kind.marker.equals(marker)) {
                    return kind;
                }
            }
            return null;
        }
    }

    /** A fenced code block: where it is, its info string, the marker above it (or null) and its text. */
    record Block(Path file, int line, String info, String marker, String text) {
        String where() {
            return RepositoryFiles.root().relativize(file) + ":" + line;
        }
    }

    private static final Pattern MARKER = Pattern.compile("^<!--\\s*example:\\s*([a-z-]+)\\s*-->$");
    private static final ObjectMapper JSON = new ObjectMapper();

    private static List<Path> documents;
    private static List<Block> blocks;

    @BeforeAll
    static void readTheDocs() throws IOException {
        Path readme = RepositoryFiles.resolve("README.md");
        assertTrue(Files.isRegularFile(readme), "no README.md at " + readme + " (is runoff.root set?)");
        documents = new ArrayList<>();
        documents.add(readme);
        try (Stream<Path> docs = Files.list(RepositoryFiles.resolve("src", "docs"))) {
            docs.filter(p -> p.getFileName().toString().endsWith(".md")).sorted().forEach(documents::add);
        }
        blocks = new ArrayList<>();
        for (Path document : documents) {
            blocks.addAll(fencedBlocks(document));
        }
    }

    /** Every fenced block of {@code file}; an unclosed fence fails. */
    static List<Block> fencedBlocks(Path file) {
        List<String> lines;
        try {
            lines = Files.readAllLines(file, StandardCharsets.UTF_8);
        } catch (IOException e) {
            throw new UncheckedIOException(e);
        }
        List<Block> found = new ArrayList<>();
        for (int i = 0; i < lines.size(); i++) {
            String line = lines.get(i);
            if (!line.startsWith("```")) {
                continue;
            }
            String info = line.substring(3).trim().toLowerCase(Locale.ROOT);
            String marker = null;
            for (int j = i - 1; j >= 0; j--) {
                String above = lines.get(j).trim();
                if (!above.isEmpty()) {
                    Matcher m = MARKER.matcher(above);
                    marker = m.matches() ? m.group(1) : null;
                    break;
                }
            }
            int start = i + 1;
            int end = start;
            while (end < lines.size() && !lines.get(end).startsWith("```")) {
                end++;
            }
            if (end == lines.size()) {
                throw new AssertionError(file + ":" + (i + 1) + ": fenced block is never closed");
            }
            found.add(new Block(file, i + 1, info, marker, String.join("\n", lines.subList(start, end))));
            i = end;
        }
        return found;
    }

    private static List<Block> jsonBlocks() {
        return blocks.stream().filter(b -> b.info().equals("json")).toList();
    }

    /** The block's kind: its marker, else what its content shows, else null. */
    static Kind kindOf(Block block) {
        if (block.marker() != null) {
            return Kind.ofMarker(block.marker());
        }
        JsonNode node;
        try {
            node = JSON.readTree(block.text());
        } catch (JsonProcessingException e) {
            return null;
        }
        if (node == null || !node.isObject()) {
            return null;
        }
        if (node.has("previousHash") && node.has("hash")) {
            return Kind.DECISION_RECORD;
        }
        if (node.has("validUntil") && node.has("weights")) {
            return Kind.CONTROL_RECORD;
        }
        if (node.has("unitId") && node.has("eventId")) {
            return Kind.OUTCOME_EVENT;
        }
        if (node.has("arms") && node.has("metric") && node.has("experimentId")) {
            return Kind.DEFINITION;
        }
        return null;
    }

    private static List<Block> blocksOf(Kind kind) {
        return jsonBlocks().stream().filter(b -> kindOf(b) == kind).toList();
    }

    private static <T extends SpecificRecord> void assertAllValidate(Kind kind, RecordCodec<T> codec) {
        List<Block> examples = blocksOf(kind);
        assertFalse(examples.isEmpty(), "the docs show no " + kind.marker + " example");
        List<String> failures = new ArrayList<>();
        long now = System.currentTimeMillis();
        for (Block block : examples) {
            Decoded<T> decoded = codec.decode(block.text().getBytes(StandardCharsets.UTF_8), now);
            if (!decoded.isValid()) {
                failures.add(block.where() + ": " + kind.marker + " example rejected: " + decoded.problems());
            }
        }
        assertTrue(failures.isEmpty(), String.join("\n", failures));
    }

    @Test
    void theReadmeAndEveryDocIsRead() {
        assertTrue(documents.size() > 1, "expected README.md and the files of src/docs, read " + documents);
        assertFalse(jsonBlocks().isEmpty(), "no ```json block in " + documents);
    }

    @Test
    void everyJsonExampleInTheDocsParses() {
        List<String> failures = new ArrayList<>();
        for (Block block : jsonBlocks()) {
            try {
                JsonNode node = JSON.readTree(block.text());
                if (node == null || node.isMissingNode()) {
                    failures.add(block.where() + ": empty json block");
                }
            } catch (JsonProcessingException e) {
                failures.add(block.where() + ": does not parse: " + e.getOriginalMessage());
            }
        }
        assertTrue(failures.isEmpty(), String.join("\n", failures));
    }

    @Test
    void everyJsonExampleIsOfAKnownTypeOrMarkedAsPlainJson() {
        List<String> failures = new ArrayList<>();
        for (Block block : jsonBlocks()) {
            if (block.marker() != null && Kind.ofMarker(block.marker()) == null) {
                failures.add(block.where() + ": unknown marker 'example: " + block.marker() + "'");
            } else if (kindOf(block) == null) {
                failures.add(block.where() + ": json block of no known record type; mark it"
                        + " <!-- example: json --> if it is a plain snippet");
            }
        }
        assertTrue(failures.isEmpty(), String.join("\n", failures));
    }

    @Test
    void everyExampleMarkerIsFollowedByAJsonBlock() {
        List<String> failures = new ArrayList<>();
        for (Block block : blocks) {
            if (block.marker() != null && !block.info().equals("json")) {
                failures.add(block.where() + ": marked 'example: " + block.marker() + "' but fenced as '"
                        + block.info() + "', not json");
            }
        }
        assertTrue(failures.isEmpty(), String.join("\n", failures));
    }

    @Test
    void everyDefinitionExampleValidates() {
        assertAllValidate(Kind.DEFINITION, RecordCodec.definitions());
    }

    @Test
    void everyOutcomeEventExampleValidates() {
        assertAllValidate(Kind.OUTCOME_EVENT, RecordCodec.outcomeEvents());
    }

    @Test
    void everyControlRecordExampleValidates() {
        assertAllValidate(Kind.CONTROL_RECORD, RecordCodec.allocationUpdates());
    }

    @Test
    void everyDecisionRecordExampleValidates() {
        assertAllValidate(Kind.DECISION_RECORD, RecordCodec.decisionRecords());
    }

    @Test
    void everyCommandIsShownAsJavaDashJarTargetRunoffJar() {
        Pattern bare = Pattern.compile("^\\s*(\\$\\s+)?runoff\\s");
        Pattern otherJar = Pattern.compile("java -jar (?!target/runoff\\.jar)\\S*runoff\\.jar");
        List<String> failures = new ArrayList<>();
        for (Path document : documents) {
            List<String> lines;
            try {
                lines = Files.readAllLines(document, StandardCharsets.UTF_8);
            } catch (IOException e) {
                throw new UncheckedIOException(e);
            }
            for (int i = 0; i < lines.size(); i++) {
                String line = lines.get(i);
                if (bare.matcher(line).find() || otherJar.matcher(line).find() || line.contains("`runoff ")) {
                    failures.add(RepositoryFiles.root().relativize(document) + ":" + (i + 1)
                            + ": write commands as `java -jar target/runoff.jar ...`: " + line.trim());
                }
            }
        }
        assertTrue(failures.isEmpty(), String.join("\n", failures));
    }
}
