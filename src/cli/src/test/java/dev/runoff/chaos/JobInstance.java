package dev.runoff.chaos;

import dev.runoff.cli.Main;
import java.io.IOException;
import java.io.UncheckedIOException;
import java.net.URI;
import java.net.http.HttpClient;
import java.net.http.HttpRequest;
import java.net.http.HttpResponse;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Duration;
import java.time.LocalDateTime;
import java.time.ZoneId;
import java.util.ArrayList;
import java.util.List;
import java.util.Map;
import java.util.concurrent.TimeUnit;
import java.util.regex.Matcher;
import java.util.regex.Pattern;

/**
 * One job instance: a JVM running the real {@code run --config FILE} command, with its own state directory
 * and HTTP port, and its pod name as {@code group.instance.id} through {@code KAFKA_GROUP_INSTANCE_ID}, as the
 * StatefulSet sets it. Every start logs to a file of its own.
 */
final class JobInstance {

    private static final Pattern STARTED = Pattern.compile("event=restore-started ");
    private static final Pattern RESTORED = Pattern.compile("event=restored store=(\\S+) .* records=(\\d+) millis=(-?\\d+)");
    private static final HttpClient HTTP = HttpClient.newBuilder().connectTimeout(Duration.ofSeconds(2)).build();

    private final String name;
    private final int port;
    private final Path config;
    private final Path dir;
    private final List<Path> logs = new ArrayList<>();
    private Process process;
    private long startedNanos;
    private long startedWallMillis;

    JobInstance(String name, int port, Path config, Path dir) {
        this.name = name;
        this.port = port;
        this.config = config;
        this.dir = dir;
    }

    String name() {
        return name;
    }

    int port() {
        return port;
    }

    boolean alive() {
        return process != null && process.isAlive();
    }

    /** Starts the JVM; returns at once. */
    synchronized void start() {
        Path log = dir.resolve(name + "-" + (logs.size() + 1) + ".log");
        logs.add(log);
        startedNanos = System.nanoTime();
        startedWallMillis = System.currentTimeMillis();
        process = Jvm.start("320m", Main.class, List.of("run", "--config", config.toString()),
                Map.of("KAFKA_GROUP_INSTANCE_ID", name), log);
    }

    /** SIGKILL: {@link Process#destroyForcibly()} on Linux sends SIGKILL; no shutdown hook runs. */
    synchronized void kill() throws InterruptedException {
        process.destroyForcibly();
        process.waitFor(30, TimeUnit.SECONDS);
    }

    /** SIGTERM ({@link Process#destroy()}): the job's shutdown hook closes Kafka Streams cleanly. */
    synchronized int stop() throws InterruptedException {
        process.destroy();
        if (!process.waitFor(90, TimeUnit.SECONDS)) {
            process.destroyForcibly();
            process.waitFor(30, TimeUnit.SECONDS);
        }
        return process.exitValue();
    }

    /** Nanos of the latest start. */
    long startedNanos() {
        return startedNanos;
    }

    /** Whether {@code /ready} answers 200 (the Kafka Streams client is RUNNING). */
    boolean ready() {
        try {
            return HTTP.send(HttpRequest.newBuilder(URI.create("http://127.0.0.1:" + port + "/ready"))
                    .timeout(Duration.ofSeconds(2)).build(), HttpResponse.BodyHandlers.discarding()).statusCode() == 200;
        } catch (IOException e) {
            return false;
        } catch (InterruptedException e) {
            Thread.currentThread().interrupt();
            return false;
        }
    }

    /** Waits until ready; the seconds from the latest start, or -1 if the timeout passed or the JVM died. */
    double awaitReady(Duration timeout) throws InterruptedException {
        long deadline = System.nanoTime() + timeout.toNanos();
        while (System.nanoTime() < deadline && alive()) {
            if (ready()) {
                return (System.nanoTime() - startedNanos) / 1e9;
            }
            Thread.sleep(100);
        }
        return -1;
    }

    /** The log of the latest start. */
    Path log() {
        return logs.get(logs.size() - 1);
    }

    /** Wall-clock milliseconds of the latest start. */
    long startedWallMillis() {
        return startedWallMillis;
    }

    /**
     * Restores logged in {@code log} (RestoreLog lines): how many started and ended, the records, the longest
     * restore and the log time of the last end.
     */
    static Restores restores(Path log) {
        long records = 0;
        long longest = 0;
        int started = 0;
        int count = 0;
        long lastEnd = -1;
        try {
            for (String line : Files.readAllLines(log)) {
                if (STARTED.matcher(line).find()) {
                    started++;
                }
                Matcher m = RESTORED.matcher(line);
                if (m.find()) {
                    count++;
                    records += Long.parseLong(m.group(2));
                    longest = Math.max(longest, Long.parseLong(m.group(3)));
                    lastEnd = logMillis(line);
                }
            }
        } catch (IOException e) {
            throw new UncheckedIOException(e);
        }
        return new Restores(started, count, records, longest, lastEnd);
    }

    /** The time of a log line (the tests' pattern starts with an ISO 8601 local time), in epoch millis. */
    private static long logMillis(String line) {
        return LocalDateTime.parse(line.substring(0, 23).replace(',', '.')).atZone(ZoneId.systemDefault())
                .toInstant().toEpochMilli();
    }

    /**
     * What one start restored.
     *
     * @param started        store partitions whose restore started
     * @param stores         store partitions restored
     * @param records        changelog records replayed
     * @param longestMillis  the longest single restore
     * @param lastEndMillis  epoch millis of the last restore's end (-1: none)
     */
    record Restores(int started, int stores, long records, long longestMillis, long lastEndMillis) {
    }
}
