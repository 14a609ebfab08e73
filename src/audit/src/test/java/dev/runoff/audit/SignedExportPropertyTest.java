package dev.runoff.audit;

import dev.runoff.testkit.SeededRandom;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertNotEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;
import com.fasterxml.jackson.databind.node.ArrayNode;
import com.fasterxml.jackson.databind.node.ObjectNode;
import dev.runoff.records.CanonicalJson;
import dev.runoff.records.Ed25519;
import dev.runoff.records.SignatureVerifier;
import dev.runoff.records.avro.DecisionRecord;
import java.math.BigInteger;
import java.nio.charset.StandardCharsets;
import java.util.ArrayList;
import java.util.List;
import java.util.Map;
import org.apache.commons.rng.UniformRandomProvider;
import org.apache.commons.rng.simple.RandomSource;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.parallel.Execution;
import org.junit.jupiter.api.parallel.ExecutionMode;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.EnumSource;

/**
 * Every single-field edit, deletion, insertion and reordering of a signed export (canonical JSON lines, as
 * {@code demo --export-decisions} writes) fails {@code audit verify} with the job's public key: a property
 * test over every deletion of one record (an export has as many as it has records, about a dozen, so random
 * draws of them mostly repeated one another) and many random edits of the other kinds from a seeded generator.
 * The latest hash is given as kept apart from the export ({@code --last-hash}): without it, cutting records off
 * the end cannot be seen (see {@link #cuttingTheEndIsCaughtOnlyWithTheLatestHash}).
 *
 * <p>Each kind of random edit draws its own seeded edits, and the kinds run concurrently when the build runs
 * test classes in parallel: the fixture is built once and only read afterwards, and every verification builds
 * its own {@link Verifier}.
 */
@Execution(ExecutionMode.CONCURRENT)
class SignedExportPropertyTest {

    private static final ObjectMapper JSON = new ObjectMapper();
    private static final List<String> ARMS = List.of("control", "green", "blue");
    /** Random edits of each kind. */
    private static final int EDITS_PER_KIND = 50;
    /** One decoder for every export read (it holds no state between records; building one parses schemas). */
    private static final EntryDecoder DECODER = new EntryDecoder(Chains.T0 + 3_600_000);

    private static SignatureVerifier keys;
    private static List<String> export;
    private static List<String> otherRun;
    private static String lastHash;

    private enum Edit { FIELD, INSERT, REORDER }

    @BeforeAll
    static void export() throws Exception {
        Ed25519.Pair job = Ed25519.generate("job-1", SeededRandom.secure(7));
        keys = SignatureVerifier.of(List.of(job.verification()));
        export = lines(SignedChainTest.signed(SimulatedJob.run(SimulatedJob.definition("checkout", ARMS, 0),
                new double[] {0.04, 0.05, 0.09}, 12, 600, 11), job, job, Integer.MAX_VALUE));
        lastHash = JSON.readTree(export.get(export.size() - 1)).get("hash").asText();
        otherRun = lines(SignedChainTest.signed(SimulatedJob.run(SimulatedJob.definition("checkout", ARMS, 0),
                new double[] {0.04, 0.05, 0.09}, 12, 600, 12), job, job, Integer.MAX_VALUE));
    }

    private static List<String> lines(List<DecisionRecord> records) {
        return records.stream().map(CanonicalJson::of).toList();
    }

    private static boolean passes(List<String> lines) {
        return passes(lines, Map.of("checkout", lastHash));
    }

    private static boolean passes(List<String> lines, Map<String, String> lastHashes) {
        List<Entry> entries = new ArrayList<>();
        for (int i = 0; i < lines.size(); i++) {
            entries.add(DECODER.decode(lines.get(i).getBytes(StandardCharsets.UTF_8), null, Position.line(i + 1)));
        }
        return new Verifier(0.001, keys, lastHashes).verify(entries).stream()
                .allMatch(ExperimentAudit::passed);
    }

    @Test
    void theUneditedExportVerifies() {
        assertTrue(export.size() >= 5, "records: " + export.size());
        assertTrue(passes(export));
        assertTrue(passes(otherRun, Map.of()));
    }

    @Test
    void cuttingTheEndIsCaughtOnlyWithTheLatestHash() {
        List<String> cut = export.subList(0, export.size() - 1);
        List<Entry> entries = new ArrayList<>();
        for (int i = 0; i < cut.size(); i++) {
            entries.add(DECODER.decode(cut.get(i).getBytes(StandardCharsets.UTF_8), null, Position.line(i + 1)));
        }
        assertTrue(new Verifier(0.001, keys).verify(entries).get(0).passed(), "documented limitation");
        Finding finding = new Verifier(0.001, keys, Map.of("checkout", lastHash)).verify(entries).get(0)
                .firstFailure().orElseThrow();
        assertEquals(Check.CHAIN, finding.check());
        assertTrue(finding.message().contains(lastHash), finding.message());
    }

    @Test
    void deletingAnyOneRecordIsCaught() {
        for (int i = 0; i < export.size(); i++) {
            List<String> edited = new ArrayList<>(export);
            edited.remove(i);
            assertFalse(passes(edited), "deleting line " + (i + 1) + " was not caught");
        }
    }

    @ParameterizedTest(name = "{0}")
    @EnumSource(Edit.class)
    void everyRandomEditIsCaught(Edit edit) throws Exception {
        UniformRandomProvider rng = RandomSource.SPLIT_MIX_64.create(20261202L + edit.ordinal());
        for (int n = 0; n < EDITS_PER_KIND; n++) {
            List<String> edited = apply(edit, rng);
            assertNotEquals(export, edited, "an edit changes the export");
            assertFalse(passes(edited), "edit " + n + " (" + edit + ") was not caught: " + diff(edited));
        }
    }

    private static List<String> apply(Edit edit, UniformRandomProvider rng) throws Exception {
        List<String> lines = new ArrayList<>(export);
        int i = rng.nextInt(lines.size());
        switch (edit) {
            case FIELD -> lines.set(i, editOneField(lines.get(i), rng));
            case INSERT -> {
                String extra = rng.nextBoolean() ? export.get(rng.nextInt(export.size()))
                        : otherRun.get(rng.nextInt(otherRun.size()));
                lines.add(rng.nextInt(lines.size() + 1), extra);
            }
            case REORDER -> {
                int j = (i + 1 + rng.nextInt(lines.size() - 1)) % lines.size();
                String a = lines.get(i);
                lines.set(i, lines.get(j));
                lines.set(j, a);
            }
        }
        return lines;
    }

    /** The line with one leaf (a field, an array item, a nested field) given another value. */
    private static String editOneField(String line, UniformRandomProvider rng) throws Exception {
        JsonNode root = JSON.readTree(line);
        List<Leaf> leaves = new ArrayList<>();
        collect(root, leaves);
        Leaf leaf = leaves.get(rng.nextInt(leaves.size()));
        JsonNode changed = changed(leaf.value(), rng);
        if (leaf.parent() instanceof ObjectNode object) {
            object.set(leaf.name(), changed);
        } else {
            ((ArrayNode) leaf.parent()).set(leaf.index(), changed);
        }
        return JSON.writeValueAsString(root);
    }

    private static JsonNode changed(JsonNode value, UniformRandomProvider rng) {
        if (value.isIntegralNumber()) {
            return JSON.getNodeFactory().numberNode(value.bigIntegerValue().add(BigInteger.valueOf(1 + rng.nextInt(3))));
        }
        if (value.isNumber()) {
            return JSON.getNodeFactory().numberNode(value.doubleValue() * (1 + rng.nextDouble()) + 1e-9);
        }
        if (value.isTextual()) {
            String text = value.asText();
            return JSON.getNodeFactory().textNode(text.isEmpty() || rng.nextBoolean() ? text + "x"
                    : (char) (text.charAt(0) == 'a' ? 'b' : 'a') + text.substring(1));
        }
        if (value.isBoolean()) {
            return JSON.getNodeFactory().booleanNode(!value.booleanValue());
        }
        return JSON.getNodeFactory().textNode("control");
    }

    private record Leaf(JsonNode parent, String name, int index, JsonNode value) {
    }

    private static void collect(JsonNode node, List<Leaf> leaves) {
        if (node instanceof ObjectNode object) {
            object.fields().forEachRemaining(e -> {
                if (e.getValue().isContainerNode()) {
                    collect(e.getValue(), leaves);
                } else {
                    leaves.add(new Leaf(object, e.getKey(), -1, e.getValue()));
                }
            });
        } else if (node instanceof ArrayNode array) {
            for (int i = 0; i < array.size(); i++) {
                if (array.get(i).isContainerNode()) {
                    collect(array.get(i), leaves);
                } else {
                    leaves.add(new Leaf(array, null, i, array.get(i)));
                }
            }
        }
    }

    private static String diff(List<String> edited) {
        StringBuilder out = new StringBuilder();
        for (int i = 0; i < Math.max(edited.size(), export.size()); i++) {
            String a = i < export.size() ? export.get(i) : null;
            String b = i < edited.size() ? edited.get(i) : null;
            if (a == null || !a.equals(b)) {
                out.append("\n line ").append(i + 1).append(": ").append(b);
            }
        }
        return out.toString();
    }
}
