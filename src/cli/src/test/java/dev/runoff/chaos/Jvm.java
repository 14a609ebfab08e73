package dev.runoff.chaos;

import java.io.IOException;
import java.io.UncheckedIOException;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.Map;

/** Starts a JVM on the test class path, as the other tests that start JVMs do. */
final class Jvm {

    private Jvm() {
    }

    /** {@code java -Xmx... main args} with {@code env} added, standard error and output to {@code log}. */
    static Process start(String heap, Class<?> main, List<String> args, Map<String, String> env, Path log) {
        String classpath = System.getProperty("surefire.test.class.path", System.getProperty("java.class.path"));
        List<String> command = new ArrayList<>(List.of(Path.of(System.getProperty("java.home"), "bin", "java")
                .toString(), "-Xmx" + heap, "-XX:+UseSerialGC", "-cp", classpath, main.getName()));
        command.addAll(args);
        ProcessBuilder builder = new ProcessBuilder(command).redirectErrorStream(true)
                .redirectOutput(ProcessBuilder.Redirect.appendTo(log.toFile()));
        builder.environment().putAll(env);
        try {
            return builder.start();
        } catch (IOException e) {
            throw new UncheckedIOException("cannot start " + main.getSimpleName(), e);
        }
    }
}
