package dev.runoff.bench;

import java.io.IOException;
import java.lang.management.ManagementFactory;
import java.lang.management.ThreadInfo;
import java.lang.management.ThreadMXBean;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.Locale;
import java.util.Map;
import java.util.TreeMap;
import java.util.stream.Collectors;
import java.util.stream.Stream;
import org.apache.kafka.common.Metric;
import org.apache.kafka.common.MetricName;
import org.apache.kafka.streams.KafkaStreams;
import org.apache.kafka.streams.ThreadMetadata;

/**
 * Where the stream threads of one timed run spent their wall time, from two snapshots (at the start and the
 * end of the run): their CPU time (from the JVM), the time Kafka Streams counts as blocked on its clients
 * (its thread metric {@code blocked-time-ns-total}, added by KIP-761: polls, producer flushes and transaction
 * calls), split into the producer's flushes and transaction calls (the producer's {@code flush-time-ns-total}
 * and {@code txn-*-time-ns-total}), commits and produce retries; the CPU of each stream thread and the tasks it
 * ran, which shows whether the work spread over the threads; the cores used by the whole process and by each
 * group of its threads (broker, producer I/O, coordinators); and, on Linux, the time the process's threads
 * waited in the scheduler's run queue for a core ({@code /proc/self/task/<tid>/schedstat}, second field, per the
 * kernel's scheduler statistics documentation), grouped by the kernel's 15-character thread names. The rest of
 * a stream thread's wall time is neither on a core nor blocked on Kafka as counted here: mostly waiting for a
 * core on a loaded machine.
 */
final class RunBreakdown {

    /** Producer and Streams metrics summed over the stream threads of one application. */
    private static final List<String> SUMMED = List.of("blocked-time-ns-total", "flush-time-ns-total",
            "txn-send-offsets-time-ns-total", "txn-commit-time-ns-total", "commit-total", "process-total",
            "record-retry-total", "record-send-total");

    private final long wallNanos;
    private final long processCpuNanos;
    private final Map<String, Long> threadCpuNanos;
    private final Map<String, Double> metrics;
    private final Map<String, Long> runQueueNanos;
    private final Map<String, String> activeTasks;

    private RunBreakdown(long wallNanos, long processCpuNanos, Map<String, Long> threadCpuNanos,
                         Map<String, Double> metrics, Map<String, Long> runQueueNanos,
                         Map<String, String> activeTasks) {
        this.wallNanos = wallNanos;
        this.processCpuNanos = processCpuNanos;
        this.threadCpuNanos = threadCpuNanos;
        this.metrics = metrics;
        this.runQueueNanos = runQueueNanos;
        this.activeTasks = activeTasks;
    }

    /** A snapshot of {@code streams}' stream threads, the process and its threads now. */
    static RunBreakdown take(KafkaStreams streams) {
        return new RunBreakdown(System.nanoTime(), processCpuNanos(), threadCpu(), metrics(streams), runQueue(),
                activeTasks(streams));
    }

    /** The active tasks of each stream thread (by the name {@link #threadCpu} gives it), sorted. */
    private static Map<String, String> activeTasks(KafkaStreams streams) {
        Map<String, String> tasks = new TreeMap<>();
        for (ThreadMetadata thread : streams.metadataForLocalThreads()) {
            String name = thread.threadName();
            tasks.put(name.substring(name.lastIndexOf("StreamThread-")), thread.activeTasks().stream()
                    .map(t -> t.taskId().toString()).sorted().collect(Collectors.joining(",")));
        }
        return tasks;
    }

    /** What happened between {@code start} and {@code this}, on four lines. */
    String since(RunBreakdown start) {
        double wall = (wallNanos - start.wallNanos) / 1e9;
        Map<String, Long> cpu = difference(threadCpuNanos, start.threadCpuNanos);
        StringBuilder text = new StringBuilder(streamThreads(start, wall, cpu.getOrDefault("stream", 0L) / 1e9));
        text.append(String.format(Locale.ROOT, "%n  cores by thread group:"));
        cpu.entrySet().stream().filter(e -> !e.getKey().startsWith("StreamThread-"))
                .sorted(Map.Entry.<String, Long>comparingByValue().reversed())
                .forEach(e -> text.append(String.format(Locale.ROOT, " %s %.2f", e.getKey(),
                        e.getValue() / 1e9 / wall)));
        text.append(String.format(Locale.ROOT, "%n  cores by stream thread (active tasks at the end):"));
        cpu.entrySet().stream().filter(e -> e.getKey().startsWith("StreamThread-"))
                .forEach(e -> text.append(String.format(Locale.ROOT, " %s %.2f [%s]", e.getKey(),
                        e.getValue() / 1e9 / wall, activeTasks.getOrDefault(e.getKey(), "?"))));
        Map<String, Long> queued = difference(runQueueNanos, start.runQueueNanos);
        if (!queued.isEmpty()) {
            text.append(String.format(Locale.ROOT, "%n  run-queue wait (thread-seconds per second):"));
            queued.entrySet().stream().sorted(Map.Entry.<String, Long>comparingByValue().reversed()).limit(6)
                    .forEach(e -> text.append(String.format(Locale.ROOT, " %s %.2f", e.getKey(),
                            e.getValue() / 1e9 / wall)));
        }
        return text.toString();
    }

    /** The CPU seconds of all stream threads between {@code start} and {@code this}. */
    double streamCpuSeconds(RunBreakdown start) {
        return difference(threadCpuNanos, start.threadCpuNanos).getOrDefault("stream", 0L) / 1e9;
    }

    /**
     * The largest share of the stream threads' CPU between {@code start} and {@code this} that one stream thread
     * used: 1 / threads when the work spread evenly, 1 when one thread did it all; NaN without stream CPU.
     */
    double busiestStreamThreadShare(RunBreakdown start) {
        Map<String, Long> cpu = difference(threadCpuNanos, start.threadCpuNanos);
        long total = cpu.getOrDefault("stream", 0L);
        long busiest = cpu.entrySet().stream().filter(e -> e.getKey().startsWith("StreamThread-"))
                .mapToLong(Map.Entry::getValue).max().orElse(0);
        return total > 0 ? (double) busiest / total : Double.NaN;
    }

    /** The process's cores and how the stream threads' wall time divides, from their summed metrics. */
    private String streamThreads(RunBreakdown start, double wall, double streamCpuSeconds) {
        Map<String, Double> m = new TreeMap<>();
        for (String name : SUMMED) {
            double value = metrics.getOrDefault(name, 0.0) - start.metrics.getOrDefault(name, 0.0);
            m.put(name, name.endsWith("-ns-total") ? value / 1e9 : value);
        }
        int threads = (int) Math.max(1, metrics.getOrDefault("threads", 1.0));
        double threadSeconds = wall * threads;
        double blocked = m.get("blocked-time-ns-total");
        double commits = m.get("commit-total");
        return String.format(Locale.ROOT, "  breakdown: process %.2f cores; %d stream threads: cpu %.0f%%, "
                        + "blocked on Kafka %.0f%% (producer flush %.0f%%, send offsets %.0f%%, commit txn %.0f%%), "
                        + "rest %.0f%% of their wall time; commits %.0f (%.1f per thread-second), %.0f events per "
                        + "commit, produce retries %.0f of %.0f sends",
                (processCpuNanos - start.processCpuNanos) / 1e9 / wall, threads,
                100 * streamCpuSeconds / threadSeconds, 100 * blocked / threadSeconds,
                100 * m.get("flush-time-ns-total") / threadSeconds,
                100 * m.get("txn-send-offsets-time-ns-total") / threadSeconds,
                100 * m.get("txn-commit-time-ns-total") / threadSeconds,
                100 * (threadSeconds - streamCpuSeconds - blocked) / threadSeconds, commits, commits / threadSeconds,
                m.get("process-total") / Math.max(1, commits), m.get("record-retry-total"),
                m.get("record-send-total"));
    }

    private static Map<String, Long> difference(Map<String, Long> now, Map<String, Long> before) {
        Map<String, Long> d = new TreeMap<>();
        now.forEach((k, v) -> d.put(k, v - before.getOrDefault(k, 0L)));
        return d;
    }

    private static long processCpuNanos() {
        return ManagementFactory.getOperatingSystemMXBean() instanceof com.sun.management.OperatingSystemMXBean os
                ? os.getProcessCpuTime() : 0;
    }

    /**
     * CPU time of the JVM's threads, summed by {@link #group}, and of each stream thread alone (keyed by its
     * name, which starts with {@code StreamThread-}).
     */
    private static Map<String, Long> threadCpu() {
        ThreadMXBean threads = ManagementFactory.getThreadMXBean();
        Map<String, Long> cpu = new TreeMap<>();
        for (ThreadInfo info : threads.getThreadInfo(threads.getAllThreadIds())) {
            if (info != null) {
                long nanos = threads.getThreadCpuTime(info.getThreadId());
                String group = group(info.getThreadName());
                if (nanos > 0) {
                    cpu.merge(group, nanos, Long::sum);
                    if (group.equals("stream")) {
                        String name = info.getThreadName();
                        cpu.put(name.substring(name.lastIndexOf("StreamThread-")), nanos);
                    }
                }
            }
        }
        return cpu;
    }

    /**
     * The group of a thread, by its name: stream threads, the broker's request handlers and network threads,
     * producer network threads, the transaction coordinator's marker sender, the broker's coordinators, garbage
     * collection, the JIT compilers, the global and state-updater threads of Kafka Streams, and the rest.
     */
    static String group(String name) {
        if (name.matches(".*-StreamThread-\\d+$")) {
            return "stream";
        }
        for (String[] g : new String[][]{{"kafka-request-handler", "broker-handlers"},
                {"kafka-network-thread", "broker-network"}, {"producer-network-thread", "producer-io"},
                {"TxnMarkerSender", "txn-markers"}, {"coordinator", "coordinators"}, {"GC", "gc"},
                {"Compiler", "jit"}, {"GlobalStreamThread", "global-thread"}, {"StateUpdater", "state-updater"}}) {
            if (name.contains(g[0])) {
                return g[1];
            }
        }
        return "other";
    }

    /** Run-queue wait of the process's threads (Linux), summed by the names the kernel keeps. */
    private static Map<String, Long> runQueue() {
        Map<String, Long> waits = new TreeMap<>();
        Path tasks = Path.of("/proc/self/task");
        if (!Files.isDirectory(tasks)) {
            return waits;
        }
        List<Path> list = new ArrayList<>();
        try (Stream<Path> s = Files.list(tasks)) {
            s.forEach(list::add);
        } catch (IOException e) {
            return waits;
        }
        for (Path task : list) {
            try {
                String comm = Files.readString(task.resolve("comm")).trim();
                String[] stat = Files.readString(task.resolve("schedstat")).trim().split(" ");
                waits.merge(comm.replaceAll("[-#_ ]?\\d+$", ""), Long.parseLong(stat[1]), Long::sum);
            } catch (IOException | RuntimeException e) {
                // the thread ended between the listing and the read: it no longer counts
            }
        }
        return waits;
    }

    /** The summed metrics of {@code streams}' clients, and the number of its stream threads. */
    private static Map<String, Double> metrics(KafkaStreams streams) {
        Map<String, Double> sums = new TreeMap<>();
        for (Map.Entry<MetricName, ? extends Metric> e : streams.metrics().entrySet()) {
            MetricName name = e.getKey();
            boolean threadLevel = name.group().equals("stream-thread-metrics");
            boolean producer = name.group().equals("producer-metrics");
            if ((threadLevel || producer) && SUMMED.contains(name.name())
                    && e.getValue().metricValue() instanceof Number n) {
                sums.merge(name.name(), n.doubleValue(), Double::sum);
            }
        }
        sums.put("threads", (double) streams.metadataForLocalThreads().size());
        return sums;
    }
}
