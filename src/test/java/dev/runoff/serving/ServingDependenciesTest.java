package dev.runoff.serving;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.IOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayDeque;
import java.util.ArrayList;
import java.util.Deque;
import java.util.HashSet;
import java.util.List;
import java.util.Set;
import java.util.regex.Matcher;
import java.util.regex.Pattern;
import java.util.stream.Stream;
import org.junit.jupiter.api.Test;

/**
 * The serving library must stay embeddable in a plain serving process: kafka-clients only. Reads the
 * sources of dev.runoff.serving and of every project package they import, transitively.
 */
class ServingDependenciesTest {

    private static final Path MAIN = Path.of("src", "main", "java");
    private static final Pattern PROJECT_IMPORT = Pattern.compile("^import\\s+(?:static\\s+)?(dev\\.runoff\\.[a-z0-9.]+?)\\.[A-Z]",
            Pattern.MULTILINE);
    private static final Pattern FORBIDDEN = Pattern.compile("\\borg\\.apache\\.kafka\\.streams\\b|^import\\s+(?:static\\s+)?kafka\\.",
            Pattern.MULTILINE);

    @Test
    void servingAndWhatItUsesNeverReferenceKafkaStreamsOrTheBroker() throws IOException {
        List<String> offenders = new ArrayList<>();
        Set<String> packages = reachablePackages("dev.runoff.serving", offenders);
        assertFalse(sources("dev.runoff.serving").isEmpty(), "no sources found under " + MAIN.toAbsolutePath());
        assertTrue(packages.contains("dev.runoff.records"), "imports were not followed: " + packages);
        assertEquals(List.of(), offenders, "files referencing org.apache.kafka.streams or the broker; packages read: "
                + packages);
    }

    @Test
    void theCheckSeesAStreamsImport() {
        // guards the pattern itself: a file with such an import must be caught
        String sample = "package x;\nimport org.apache.kafka.streams.KafkaStreams;\nclass A {}\n";
        assertTrue(FORBIDDEN.matcher(sample).find());
        assertTrue(FORBIDDEN.matcher("import kafka.server.KafkaConfig;").find());
        assertFalse(FORBIDDEN.matcher("import org.apache.kafka.clients.consumer.Consumer;").find());
    }

    private static Set<String> reachablePackages(String start, List<String> offenders) throws IOException {
        Set<String> seen = new HashSet<>();
        Deque<String> queue = new ArrayDeque<>(List.of(start));
        while (!queue.isEmpty()) {
            String pkg = queue.pop();
            if (!seen.add(pkg)) {
                continue;
            }
            for (Path file : sources(pkg)) {
                String text = Files.readString(file);
                if (FORBIDDEN.matcher(text).find()) {
                    offenders.add(MAIN.relativize(file).toString());
                }
                Matcher imports = PROJECT_IMPORT.matcher(text);
                while (imports.find()) {
                    queue.add(imports.group(1));
                }
            }
        }
        return seen;
    }

    private static List<Path> sources(String pkg) throws IOException {
        Path dir = MAIN.resolve(pkg.replace('.', '/'));
        if (!Files.isDirectory(dir)) {
            return List.of();
        }
        try (Stream<Path> files = Files.list(dir)) {
            return files.filter(f -> f.toString().endsWith(".java")).sorted().toList();
        }
    }
}
