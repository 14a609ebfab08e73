package dev.runoff.testkit;

import java.io.IOException;
import java.io.UncheckedIOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.Comparator;
import java.util.stream.Stream;

/** Directories under the module's {@code target/}, emptied of whatever an earlier run left there. */
public final class Directories {

    private Directories() {
    }

    /**
     * The absolute path of {@code target/tests/<name>}, which does not exist on return: a directory an
     * earlier run left there is deleted with everything in it.
     *
     * @throws UncheckedIOException when the old directory cannot be deleted
     */
    public static Path fresh(String name) {
        Path dir = Path.of("target", "tests", name).toAbsolutePath();
        deleteRecursively(dir);
        return dir;
    }

    /** Deletes {@code dir} with everything in it; nothing happens when it does not exist. */
    public static void deleteRecursively(Path dir) {
        if (!Files.exists(dir)) {
            return;
        }
        try (Stream<Path> paths = Files.walk(dir)) {
            for (Path p : paths.sorted(Comparator.reverseOrder()).toList()) {
                Files.delete(p);
            }
        } catch (IOException e) {
            throw new UncheckedIOException("could not delete " + dir, e);
        }
    }
}
