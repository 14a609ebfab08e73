package dev.runoff.cli;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.IOException;
import java.net.InetAddress;
import java.net.ServerSocket;
import java.nio.charset.StandardCharsets;
import java.nio.file.Path;
import java.time.Duration;
import java.util.List;
import java.util.concurrent.TimeUnit;
import org.junit.jupiter.api.Test;

/** A broker that does not answer: one clear line, within the user's timeout (not Kafka's defaults). */
class UnreachableBrokerIT {

    /** A local port nobody listens on: bound, then released. */
    private static int closedPort() throws IOException {
        try (ServerSocket s = new ServerSocket(0, 1, InetAddress.getLoopbackAddress())) {
            return s.getLocalPort();
        }
    }

    @Test
    void topicsCreateAgainstAClosedPortSaysNoBrokerAnsweredInOneLine() throws IOException {
        String address = "127.0.0.1:" + closedPort();
        long start = System.nanoTime();
        CliRun r = CliRun.of("topics", "create", "--bootstrap-server", address, "--timeout-ms", "1000");
        Duration took = Duration.ofNanos(System.nanoTime() - start);
        assertEquals(1, r.exitCode(), r.err());
        assertEquals("", r.out());
        assertEquals("runoff topics create: no broker answered at " + address + " within 1000 ms",
                r.err().strip());
        assertEquals(1, r.err().lines().count(), r.err());
        // a generous bound: Kafka's own defaults took over a minute here
        assertTrue(took.compareTo(Duration.ofSeconds(30)) < 0, "took " + took);
    }

    @Test
    void experimentListAgainstAClosedPortSaysNoBrokerAnsweredInOneLine() throws IOException {
        String address = "127.0.0.1:" + closedPort();
        CliRun r = CliRun.of("experiment", "list", "--bootstrap-server", address, "--timeout-ms", "1000");
        assertEquals(1, r.exitCode(), r.err());
        assertEquals(1, r.err().lines().count(), r.err());
        assertTrue(r.err().startsWith("runoff experiment list: no broker answered in time"), r.err());
    }

    @Test
    void topicsCreateAgainstAClosedPortPrintsNoConnectionWarningsInItsOwnProcess() throws Exception {
        String address = "127.0.0.1:" + closedPort();
        String classpath = System.getProperty("surefire.test.class.path", System.getProperty("java.class.path"));
        Process p = new ProcessBuilder(Path.of(System.getProperty("java.home"), "bin", "java").toString(),
                "-cp", classpath, "-Xmx256m", Main.class.getName(), "topics", "create", "--bootstrap-server",
                address, "--timeout-ms", "1500").redirectOutput(ProcessBuilder.Redirect.DISCARD).start();
        String err = new String(p.getErrorStream().readAllBytes(), StandardCharsets.UTF_8);
        assertTrue(p.waitFor(60, TimeUnit.SECONDS), "still running");
        assertEquals(1, p.exitValue(), err);
        assertEquals(List.of("runoff topics create: no broker answered at " + address + " within 1500 ms"),
                err.lines().toList());
    }
}
