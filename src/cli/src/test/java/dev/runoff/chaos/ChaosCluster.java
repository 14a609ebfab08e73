package dev.runoff.chaos;

import dev.runoff.records.Ed25519;
import dev.runoff.records.Pem;
import dev.runoff.testkit.Ports;
import dev.runoff.testkit.SeededRandom;
import java.io.IOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Duration;
import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.concurrent.TimeUnit;

/**
 * The broker process and the job instances of one suite run, with the settings the deploy manifests use
 * (exactly-once, static membership from the pod name, 10 s session, one standby) and short job intervals.
 */
final class ChaosCluster implements AutoCloseable {

    static final String APPLICATION = "chaos";

    private final Path dir;
    private final Process broker;
    private final String bootstrap;
    private final Path publicKey;
    private final List<JobInstance> instances = new ArrayList<>();

    /** Starts the broker process in {@code dir} and creates the job's topics with {@code topics create}. */
    ChaosCluster(Path dir, int partitions) throws IOException, InterruptedException {
        this.dir = Files.createDirectories(dir);
        Path address = dir.resolve("bootstrap.txt");
        broker = Jvm.start("512m", ChaosBroker.class, List.of(dir.resolve("kafka").toString(), address.toString()),
                Map.of(), dir.resolve("broker.log"));
        long deadline = System.nanoTime() + TimeUnit.SECONDS.toNanos(120);
        while (!Files.exists(address)) {
            if (!broker.isAlive() || System.nanoTime() > deadline) {
                throw new IllegalStateException("the broker did not start: " + Files.readString(dir.resolve("broker.log")));
            }
            Thread.sleep(100);
        }
        bootstrap = Files.readString(address, StandardCharsets.UTF_8).strip();
        Ed25519.Pair keys = Ed25519.generate("chaos", SeededRandom.secure(7));
        Files.writeString(dir.resolve("signing.pem"), Pem.write(keys.signing()));
        publicKey = Files.writeString(dir.resolve("public.pem"), Pem.write(keys.verification()));
        Cli topics = Cli.run("topics", "create", "--bootstrap-server", bootstrap, "--partitions",
                String.valueOf(partitions), "--replication-factor", "1");
        if (topics.exitCode() != 0) {
            throw new IllegalStateException("topics create: " + topics.err());
        }
    }

    String bootstrap() {
        return bootstrap;
    }

    Path publicKey() {
        return publicKey;
    }

    Path brokerLog() {
        return dir.resolve("broker.log");
    }

    /** A new instance {@code chaos-N} (not started) with {@code extra} job settings. */
    JobInstance instance(Map<String, String> extra) throws IOException {
        return instance(APPLICATION, extra);
    }

    /** A new instance {@code APPLICATION-N} of {@code application} (not started) with {@code extra} settings. */
    JobInstance instance(String application, Map<String, String> extra) throws IOException {
        String name = application + "-" + instances.size();
        int port = Ports.free();
        Map<String, String> settings = new LinkedHashMap<>();
        settings.put("bootstrap.servers", bootstrap);
        settings.put("application.id", application);
        settings.put("state.dir", dir.resolve(name + "-state").toString());
        settings.put("application.server", "127.0.0.1:" + port);
        settings.put("processing.guarantee", "exactly_once_v2");
        settings.put("num.stream.threads", "1");
        settings.put("num.standby.replicas", "1");
        settings.put("consumer.session.timeout.ms", "10000");
        settings.put("consumer.heartbeat.interval.ms", "1000");
        settings.put("runoff.http.port", String.valueOf(port));
        settings.put("runoff.flush.interval.ms", "200");
        settings.put("runoff.allocate.interval.ms", "200");
        settings.put("runoff.signing.key.file", dir.resolve("signing.pem").toString());
        settings.put("runoff.signing.key.id", "chaos");
        settings.putAll(extra);
        List<String> lines = new ArrayList<>();
        settings.forEach((k, v) -> lines.add(k + "=" + v.replace("\\", "\\\\")));
        Path config = Files.write(dir.resolve(name + ".properties"), lines);
        JobInstance instance = new JobInstance(name, port, config, dir);
        instances.add(instance);
        return instance;
    }

    /** Publishes a definition given as JSON with {@code experiment put}. */
    void put(String id, String json) throws IOException {
        Path file = Files.writeString(dir.resolve(id + ".json"), json);
        Cli put = Cli.run("experiment", "put", file.toString(), "--bootstrap-server", bootstrap);
        if (put.exitCode() != 0) {
            throw new IllegalStateException("experiment put " + id + ": " + put.err());
        }
    }

    /** Waits for {@code instance} to answer 200 for every experiment of {@code ids} (it holds them all). */
    static void awaitKnown(JobInstance instance, Iterable<String> ids, Duration timeout) throws Exception {
        long deadline = System.nanoTime() + timeout.toNanos();
        for (String id : ids) {
            while (dev.runoff.testkit.Http.get(instance.port(), "/experiments/" + id).statusCode() != 200) {
                if (System.nanoTime() > deadline) {
                    throw new AssertionError(instance.name() + " never knew " + id);
                }
                Thread.sleep(200);
            }
        }
    }

    /** Kills the instances still running and stops the broker. */
    @Override
    public void close() {
        try {
            for (JobInstance instance : instances) {
                if (instance.alive()) {
                    instance.kill();
                }
            }
            try {
                broker.getOutputStream().close();
            } catch (IOException ignored) {
                // the broker is gone already
            }
            if (!broker.waitFor(60, TimeUnit.SECONDS)) {
                broker.destroyForcibly();
            }
        } catch (InterruptedException e) {
            broker.destroyForcibly();
            Thread.currentThread().interrupt();
        }
    }
}
