package dev.runoff.job;

import java.util.ArrayList;
import java.util.Collection;
import java.util.HashSet;
import java.util.List;
import java.util.Map;
import java.util.Optional;
import java.util.Set;
import java.util.TreeMap;
import java.util.concurrent.ExecutionException;
import java.util.concurrent.TimeUnit;
import java.util.concurrent.TimeoutException;
import java.util.stream.Collectors;
import java.util.Properties;
import org.apache.kafka.clients.admin.Admin;
import org.apache.kafka.clients.admin.AdminClientConfig;
import org.apache.kafka.clients.admin.AlterConfigOp;
import org.apache.kafka.clients.admin.Config;
import org.apache.kafka.clients.admin.ConfigEntry;
import org.apache.kafka.clients.admin.NewTopic;
import org.apache.kafka.clients.admin.TopicDescription;
import org.apache.kafka.common.KafkaFuture;
import org.apache.kafka.common.config.ConfigResource;
import org.apache.kafka.common.errors.TopicExistsException;
import org.apache.kafka.common.errors.UnknownTopicOrPartitionException;

/**
 * Creates the job's topics, idempotently: a missing topic is created with its settings; an existing one
 * keeps its partitions (changing them would move keys between partitions) and gets the promised settings
 * where they differ. Running it twice changes nothing the second time.
 */
public final class TopicCreator {

    /** What happened to one topic. */
    public enum Status {
        /** The topic did not exist and was created. */
        CREATED,
        /** The topic existed with the promised settings. */
        UNCHANGED,
        /** The topic existed; some settings were set to the promised values. */
        UPDATED
    }

    /**
     * The outcome for one topic.
     *
     * @param topic      topic name
     * @param status     what was done
     * @param partitions its partition count now
     * @param detail     settings changed, or a note (an existing topic with another partition count); may be empty
     */
    public record Outcome(String topic, Status status, int partitions, String detail) {
    }

    /** The first request to the cluster got no answer in time: no broker answered at all. */
    public static final class NoAnswerException extends IllegalStateException {
        private static final long serialVersionUID = 1L;

        NoAnswerException(String message, Throwable cause) {
            super(message, cause);
        }
    }

    private final Admin admin;
    private final long timeoutMs;

    /**
     * An admin client for {@code config} that gives up within {@code timeoutMs}: the API and request timeouts
     * are {@code timeoutMs}, and connection set-up and reconnection back-off stay within it, so an unreachable
     * broker fails the first call after {@code timeoutMs} instead of Kafka's defaults (a minute and more).
     */
    public static Admin admin(JobConfig config, long timeoutMs) {
        Properties props = config.clientProperties(JobConfig.Client.ADMIN);
        long timeout = Math.max(1, timeoutMs);
        props.put(AdminClientConfig.DEFAULT_API_TIMEOUT_MS_CONFIG, String.valueOf(timeout));
        props.put(AdminClientConfig.REQUEST_TIMEOUT_MS_CONFIG, String.valueOf(timeout));
        props.put(AdminClientConfig.SOCKET_CONNECTION_SETUP_TIMEOUT_MS_CONFIG, String.valueOf(Math.min(timeout, 10_000)));
        props.put(AdminClientConfig.SOCKET_CONNECTION_SETUP_TIMEOUT_MAX_MS_CONFIG, String.valueOf(timeout));
        props.put(AdminClientConfig.RECONNECT_BACKOFF_MAX_MS_CONFIG, String.valueOf(Math.min(timeout, 1_000)));
        props.put(AdminClientConfig.RETRY_BACKOFF_MAX_MS_CONFIG, String.valueOf(Math.min(timeout, 1_000)));
        return Admin.create(props);
    }

    /** A creator using {@code admin}, waiting at most {@code timeoutMs} for each request. */
    public TopicCreator(Admin admin, long timeoutMs) {
        this.admin = admin;
        this.timeoutMs = timeoutMs;
    }

    /**
     * Ensures every topic of {@code specs} exists with its settings.
     *
     * @param partitions        partitions of a created topic, >= 1
     * @param replicationFactor replicas of a created topic; empty for the broker's default
     * @throws IllegalArgumentException when {@code partitions} or the replication factor is below 1
     * @throws IllegalStateException    when the cluster refuses or does not answer in time
     */
    public List<Outcome> ensure(List<TopicSpec> specs, int partitions, Optional<Short> replicationFactor) {
        if (partitions < 1) {
            throw new IllegalArgumentException("partitions must be >= 1, got " + partitions);
        }
        if (replicationFactor.isPresent() && replicationFactor.get() < 1) {
            throw new IllegalArgumentException("replication factor must be >= 1, got " + replicationFactor.get());
        }
        Set<String> existing;
        try {
            existing = await(admin.listTopics().names(), "list topics");
        } catch (IllegalStateException e) {
            if (timedOut(e.getCause())) {
                throw new NoAnswerException("no broker answered within " + timeoutMs + " ms", e.getCause());
            }
            throw e;
        }
        List<NewTopic> missing = specs.stream().filter(s -> !existing.contains(s.name()))
                .map(s -> new NewTopic(s.name(), Optional.of(partitions), replicationFactor).configs(s.configs()))
                .toList();
        Set<String> created = create(missing);
        Map<String, TopicDescription> described = describe(specs.stream().map(TopicSpec::name).toList());
        List<Outcome> outcomes = new ArrayList<>();
        for (TopicSpec spec : specs) {
            int count = described.get(spec.name()).partitions().size();
            if (created.contains(spec.name())) {
                outcomes.add(new Outcome(spec.name(), Status.CREATED, count, ""));
            } else {
                outcomes.add(reconcile(spec, count, partitions));
            }
        }
        return outcomes;
    }

    /**
     * Describes {@code names}. A topic just created may not be known yet to the broker that answers (its
     * metadata reaches the brokers asynchronously): such an answer is asked again, every 100 ms, within the
     * timeout.
     */
    private Map<String, TopicDescription> describe(List<String> names) {
        long deadline = System.nanoTime() + TimeUnit.MILLISECONDS.toNanos(timeoutMs);
        while (true) {
            try {
                return await(admin.describeTopics(names).allTopicNames(), "describe topics");
            } catch (IllegalStateException e) {
                if (!(e.getCause() instanceof UnknownTopicOrPartitionException) || System.nanoTime() > deadline) {
                    throw e;
                }
            }
            try {
                Thread.sleep(100);
            } catch (InterruptedException e) {
                Thread.currentThread().interrupt();
                throw failure("describe topics", e);
            }
        }
    }

    /** The current value of each of {@code keys} on {@code topic} (missing keys are absent). */
    public Map<String, String> configs(String topic, Collection<String> keys) {
        ConfigResource resource = new ConfigResource(ConfigResource.Type.TOPIC, topic);
        Config config = await(admin.describeConfigs(List.of(resource)).all(), "describe configs of " + topic)
                .get(resource);
        Map<String, String> values = new TreeMap<>();
        for (String key : keys) {
            ConfigEntry entry = config.get(key);
            if (entry != null) {
                values.put(key, entry.value());
            }
        }
        return values;
    }

    private Set<String> create(List<NewTopic> missing) {
        Set<String> created = new HashSet<>();
        if (missing.isEmpty()) {
            return created;
        }
        for (Map.Entry<String, KafkaFuture<Void>> e : admin.createTopics(missing).values().entrySet()) {
            try {
                await(e.getValue(), "create topic " + e.getKey());
                created.add(e.getKey());
            } catch (IllegalStateException failed) {
                if (!(failed.getCause() instanceof TopicExistsException)) {
                    throw failed;
                }
                // created meanwhile by someone else: reconciled like any existing topic
            }
        }
        return created;
    }

    private Outcome reconcile(TopicSpec spec, int count, int requested) {
        Map<String, String> current = configs(spec.name(), spec.configs().keySet());
        Map<String, String> wrong = new TreeMap<>(spec.configs());
        wrong.entrySet().removeIf(e -> e.getValue().equals(current.get(e.getKey())));
        String note = count == requested ? "" : "has " + count + " partitions (not " + requested + "): left as is";
        if (wrong.isEmpty()) {
            return new Outcome(spec.name(), Status.UNCHANGED, count, note);
        }
        ConfigResource resource = new ConfigResource(ConfigResource.Type.TOPIC, spec.name());
        List<AlterConfigOp> ops = wrong.entrySet().stream()
                .map(e -> new AlterConfigOp(new ConfigEntry(e.getKey(), e.getValue()), AlterConfigOp.OpType.SET))
                .toList();
        await(admin.incrementalAlterConfigs(Map.of(resource, ops)).all(), "alter configs of " + spec.name());
        String changed = wrong.entrySet().stream().map(e -> e.getKey() + ": " + current.get(e.getKey()) + " -> "
                + e.getValue()).collect(Collectors.joining(", "));
        return new Outcome(spec.name(), Status.UPDATED, count, note.isEmpty() ? changed : changed + "; " + note);
    }

    private <T> T await(KafkaFuture<T> future, String what) {
        try {
            return future.get(timeoutMs, TimeUnit.MILLISECONDS);
        } catch (ExecutionException e) {
            throw failure(what, e.getCause());
        } catch (InterruptedException e) {
            Thread.currentThread().interrupt();
            throw failure(what, e);
        } catch (TimeoutException e) {
            throw failure(what, e);
        }
    }

    private static boolean timedOut(Throwable cause) {
        return cause instanceof TimeoutException || cause instanceof org.apache.kafka.common.errors.TimeoutException;
    }

    private IllegalStateException failure(String what, Throwable cause) {
        String reason = timedOut(cause) ? "no answer within " + timeoutMs + " ms" : String.valueOf(
                cause.getMessage());
        return new IllegalStateException("could not " + what + ": " + reason, cause);
    }
}
