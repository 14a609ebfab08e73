package dev.runoff.chaos;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.runoff.records.avro.ArmState;
import dev.runoff.records.avro.DecisionRecord;
import dev.runoff.testkit.Directories;
import java.nio.charset.StandardCharsets;
import java.nio.file.Path;
import java.time.Duration;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;
import java.util.Locale;
import java.util.Map;
import org.apache.kafka.clients.admin.Admin;
import org.apache.kafka.clients.admin.AdminClientConfig;
import org.apache.kafka.clients.admin.NewTopic;
import org.apache.kafka.clients.producer.KafkaProducer;
import org.apache.kafka.clients.producer.ProducerConfig;
import org.apache.kafka.clients.producer.ProducerRecord;
import org.apache.kafka.common.serialization.ByteArraySerializer;
import org.apache.kafka.common.serialization.StringSerializer;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.condition.EnabledIfSystemProperty;

/**
 * Restore time against state size: one instance (one stream thread, six input partitions, no standby) folds
 * N units of one experiment (an application id and an outcomes topic of its own), is killed with SIGKILL and restarted, then stopped with SIGTERM and restarted; each
 * restart's restores are read from its log (RestoreLog lines). Once with Kafka Streams' default stores and
 * once with {@code enable.transactional.statestores=true} (Kafka Streams 4.4, KIP-892: under exactly-once a
 * crash no longer wipes the stores). Runs only when asked:
 * {@code mvn -B verify -Pchaos -Dit.test=RestoreSizeIT -Drestore.units=10000,100000}
 * (optional {@code -Drestore.transactional=false,true}); prints one line per size and setting.
 */
@EnabledIfSystemProperty(named = "restore.units", matches = ".+")
class RestoreSizeIT {

    private static final Duration TIMEOUT = Duration.ofMinutes(10);

    @Test
    void restoreAfterAKillReplaysTheChangelogUnlessTheStoresAreTransactional() throws Exception {
        List<Integer> sizes = Arrays.stream(System.getProperty("restore.units").split(","))
                .map(String::strip).map(Integer::parseInt).toList();
        List<Boolean> settings = Arrays.stream(System.getProperty("restore.transactional", "false,true").split(","))
                .map(String::strip).map(Boolean::parseBoolean).toList();
        List<String> table = new ArrayList<>();
        try (ChaosCluster cluster = new ChaosCluster(Directories.fresh("restore-size"), 6);
             DecisionWatch watch = new DecisionWatch(cluster.bootstrap(), "runoff.decisions")) {
            for (int units : sizes) {
                for (boolean transactional : settings) {
                    table.add(measure(cluster, watch, units, transactional));
                }
            }
        }
        System.out.println("=== restore time against state size ===");
        table.forEach(System.out::println);
    }

    private static String measure(ChaosCluster cluster, DecisionWatch watch, int units, boolean transactional)
            throws Exception {
        String app = "restore-" + units + (transactional ? "-tx" : "");
        cluster.put(app, "{\"experimentId\": \"" + app + "\", \"arms\": [\"a\", \"b\"], \"metric\": {\"kind\":"
                + " \"BERNOULLI\", \"trialEvent\": \"EXPOSURE\", \"successEvent\": \"CLICK\"}, \"allocation\":"
                + " {\"rule\": \"TOP_TWO_THOMPSON\", \"warmUpTrials\": 1000000000}, \"stopping\": {\"rule\": \"GLR\","
                + " \"delta\": 0.05, \"minTrialsPerArm\": 1000000000}, \"recomputePeriodMs\": 1000,"
                + " \"heartbeatMs\": 10000, \"counting\": \"EXPOSURE\"}");
        String outcomes = app + ".outcomes";
        try (Admin admin = Admin.create(Map.of(AdminClientConfig.BOOTSTRAP_SERVERS_CONFIG, cluster.bootstrap()))) {
            admin.createTopics(List.of(new NewTopic(outcomes, 6, (short) 1))).all().get();
        }
        JobInstance job = cluster.instance(app, Map.of("num.standby.replicas", "0",
                "enable.transactional.statestores", String.valueOf(transactional),
                "runoff.topic.outcomes", outcomes));
        job.start();
        assertTrue(job.awaitReady(TIMEOUT) > 0, app + " never ready");
        ChaosCluster.awaitKnown(job, List.of(app), TIMEOUT);
        Probe.untilAccepted(cluster.bootstrap(), outcomes, java.util.Set.of(app), TIMEOUT);
        long fed = System.nanoTime();
        try (KafkaProducer<String, byte[]> producer = new KafkaProducer<>(Map.of(
                ProducerConfig.BOOTSTRAP_SERVERS_CONFIG, cluster.bootstrap(), ProducerConfig.LINGER_MS_CONFIG, 20,
                ProducerConfig.BATCH_SIZE_CONFIG, 262_144), new StringSerializer(), new ByteArraySerializer())) {
            for (int u = 0; u < units; u++) {
                String unit = "u" + u;
                producer.send(new ProducerRecord<>(outcomes, unit, ("{\"experimentId\":\"" + app
                        + "\",\"unitId\":\"" + unit + "\",\"eventId\":\"" + unit + "\",\"type\":\"EXPOSURE\","
                        + "\"timestamp\":" + System.currentTimeMillis() + ",\"arm\":\"" + (u % 2 == 0 ? "a" : "b")
                        + "\"}").getBytes(StandardCharsets.UTF_8)));
            }
        }
        awaitFolded(watch, app, units);
        double foldSeconds = (System.nanoTime() - fed) / 1e9;
        job.kill();
        String killed = restart(job, app);
        job.stop();
        String clean = restart(job, app);
        job.stop();
        return String.format(Locale.ROOT, "%,d units, transactional stores %s: folded in %.0f s (%.0f events/s);"
                + " after SIGKILL %s; after SIGTERM %s", units, transactional, foldSeconds, units / foldSeconds,
                killed, clean);
    }

    /** Starts {@code job} again and waits until every restore it began has ended; describes the restore. */
    private static String restart(JobInstance job, String app) throws Exception {
        job.start();
        double ready = job.awaitReady(TIMEOUT);
        assertTrue(ready > 0, app + " never ready after a restart");
        ChaosCluster.awaitKnown(job, List.of(app), TIMEOUT);
        long deadline = System.nanoTime() + TIMEOUT.toNanos();
        JobInstance.Restores r = JobInstance.restores(job.log());
        while (r.stores() < r.started() && System.nanoTime() < deadline) {
            Thread.sleep(250);
            r = JobInstance.restores(job.log());
        }
        double restored = r.lastEndMillis() < 0 ? 0 : (r.lastEndMillis() - job.startedWallMillis()) / 1000.0;
        return String.format(Locale.ROOT, "ready %.1f s, %d store partitions restored (%,d records, longest"
                + " %.1f s, last done %.1f s after the start)", ready, r.stores(), r.records(),
                r.longestMillis() / 1000.0, restored);
    }

    private static void awaitFolded(DecisionWatch watch, String app, int units) throws InterruptedException {
        long deadline = System.nanoTime() + TIMEOUT.toNanos();
        while (System.nanoTime() < deadline) {
            List<DecisionRecord> chain = watch.chains().get(app);
            if (chain != null && chain.get(chain.size() - 1).getArms().stream().mapToLong(ArmState::getTrials)
                    .sum() == units) {
                return;
            }
            Thread.sleep(500);
        }
        assertEquals(units, -1, app + ": the units were not all folded in time");
    }
}
