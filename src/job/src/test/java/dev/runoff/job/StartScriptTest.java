package dev.runoff.job;

import dev.runoff.testkit.RepositoryFiles;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.IOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.nio.file.attribute.PosixFilePermissions;
import java.util.ArrayList;
import java.util.List;
import java.util.Map;
import java.util.concurrent.TimeUnit;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/**
 * deploy/runoff.sh, the image's entry point, run with a fake {@code java} first on PATH that records the
 * arguments it was given and the process id it runs as.
 */
class StartScriptTest {

    @TempDir
    Path dir;

    private List<String> runScript(Map<String, String> env, String... args) throws IOException, InterruptedException {
        Path bin = Files.createDirectories(dir.resolve("bin"));
        Path recorded = dir.resolve("args");
        Path fake = bin.resolve("java");
        Files.writeString(fake, "#!/bin/sh\necho $$ > '" + dir.resolve("pid") + "'\n"
                + "for a in \"$@\"; do printf '%s\\n' \"$a\"; done > '" + recorded + "'\n");
        Files.setPosixFilePermissions(fake, PosixFilePermissions.fromString("rwxr-xr-x"));
        List<String> command = new ArrayList<>(List.of("sh", RepositoryFiles.resolve("deploy", "runoff.sh").toString()));
        command.addAll(List.of(args));
        ProcessBuilder pb = new ProcessBuilder(command).redirectErrorStream(true);
        pb.environment().put("PATH", bin + ":" + System.getenv("PATH"));
        pb.environment().remove("JAVA_OPTS");
        pb.environment().remove("JAVA_MEMORY_OPTS");
        pb.environment().putAll(env);
        Process p = pb.start();
        String output = new String(p.getInputStream().readAllBytes(), StandardCharsets.UTF_8);
        assertTrue(p.waitFor(30, TimeUnit.SECONDS));
        assertEquals(0, p.exitValue(), output);
        // exec replaces the shell: java keeps the script's process id, so the container's SIGTERM reaches
        // the JVM and the job's shutdown hook runs
        assertEquals(String.valueOf(p.pid()), Files.readString(dir.resolve("pid")).trim(), "java was not exec'd");
        return Files.readAllLines(recorded);
    }

    @Test
    void theDefaultCommandRunsTheJobWithMemoryFlagsFromTheContainerLimit() throws Exception {
        List<String> args = runScript(Map.of("JAR_FILE", "/opt/runoff/runoff.jar"));
        int jar = args.indexOf("-jar");
        assertEquals(List.of("-jar", "/opt/runoff/runoff.jar", "run", "--config", "/etc/runoff/runoff.properties"),
                args.subList(jar, args.size()));
        // JDK documentation (java command): MaxRAMPercentage sizes the heap from the container's memory limit
        assertTrue(args.contains("-XX:MaxRAMPercentage=50"), args.toString());
        assertTrue(args.contains("-XX:+ExitOnOutOfMemoryError"), args.toString());
    }

    @Test
    void argumentsAndExtraJvmFlagsPassThrough() throws Exception {
        List<String> args = runScript(Map.of("JAVA_OPTS", "-Dx=1 -XX:+UseG1GC", "JAVA_MEMORY_OPTS", "-Xmx300m"),
                "topics", "create", "--config", "/etc/runoff/runoff.properties", "--partitions", "12");
        assertEquals("-Xmx300m", args.get(0));
        assertTrue(args.indexOf("-Dx=1") < args.indexOf("-jar"), args.toString());
        assertTrue(args.contains("-XX:+UseG1GC"));
        assertEquals(List.of("topics", "create", "--config", "/etc/runoff/runoff.properties", "--partitions", "12"),
                args.subList(args.size() - 6, args.size()));
        assertTrue(!args.contains("-XX:MaxRAMPercentage=50"), "JAVA_MEMORY_OPTS replaces the default");
    }

    @Test
    void theScriptSetsNoVariableWithTheSettingsPrefixes() throws IOException {
        // RUNOFF_* and KAFKA_* variables are job settings (JobConfig): the script must not define any
        List<String> lines = Files.readAllLines(RepositoryFiles.resolve("deploy", "runoff.sh"));
        assertTrue(lines.stream().noneMatch(l -> l.startsWith("RUNOFF_") || l.startsWith("KAFKA_")), lines.toString());
    }
}
