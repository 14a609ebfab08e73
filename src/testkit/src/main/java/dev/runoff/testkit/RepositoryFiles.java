package dev.runoff.testkit;

import java.nio.file.Path;

/** Files at the top of the repository (deploy/, schemas/, README.md), found from any module's tests. */
public final class RepositoryFiles {

    private RepositoryFiles() {
    }

    /**
     * The repository's top folder: the {@code runoff.root} system property that the build sets for every
     * test, or the working directory when a test runs without it.
     */
    public static Path root() {
        return Path.of(System.getProperty("runoff.root", ".")).toAbsolutePath().normalize();
    }

    /** {@code first/more...} under the repository's top folder. */
    public static Path resolve(String first, String... more) {
        return root().resolve(Path.of(first, more));
    }
}
