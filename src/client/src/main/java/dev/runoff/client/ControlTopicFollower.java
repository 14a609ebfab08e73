package dev.runoff.client;

import java.time.Duration;
import java.util.HashMap;
import java.util.Map;
import java.util.Objects;
import java.util.function.Function;
import org.apache.kafka.clients.consumer.Consumer;
import org.apache.kafka.clients.consumer.ConsumerConfig;
import org.apache.kafka.clients.consumer.KafkaConsumer;
import org.apache.kafka.common.serialization.ByteArrayDeserializer;
import org.apache.kafka.common.serialization.StringDeserializer;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;

/**
 * Keeps an {@link AllocationTable} up to date from the compacted control topic. Start one per serving
 * process and table; {@link #close()} it on shutdown.
 *
 * <p>It uses kafka-clients only: a {@link KafkaConsumer} with no consumer group (manual assignment of every
 * partition, no offset commits), reading from the beginning of each partition with
 * {@code isolation.level=read_committed} (so records of aborted job transactions are never applied), on one
 * daemon thread. {@link Builder#start()} returns once the table has read every partition up to the end
 * offsets it saw when it started, so the first request does not see an empty table; after that the thread
 * keeps following the topic. Failed polls are counted in {@link ServingMetrics#pollErrors()}, logged and
 * retried after a back-off; malformed records (and, when the table verifies signatures, unverified ones)
 * are skipped and counted by the table. Neither ends the thread.
 */
public final class ControlTopicFollower implements AutoCloseable {
    /** Default name of the control topic. */
    public static final String DEFAULT_TOPIC = "runoff.allocations";

    private static final Logger LOG = LoggerFactory.getLogger(ControlTopicFollower.class);
    private static final Duration JOIN_TIMEOUT = Duration.ofSeconds(30);

    private final AllocationTable table;
    private final String topic;
    private final FollowLoop loop;
    private final Thread thread;

    private ControlTopicFollower(AllocationTable table, String topic, FollowLoop loop) {
        this.table = table;
        this.topic = topic;
        this.loop = loop;
        this.thread = new Thread(loop, "runoff-control-follower-" + topic);
        this.thread.setDaemon(true);
    }

    /**
     * Starts describing a follower.
     *
     * @param table            the table to keep up to date
     * @param bootstrapServers the Kafka cluster, {@code host:port[,host:port...]}
     * @throws IllegalArgumentException when {@code bootstrapServers} is blank
     */
    public static Builder builder(AllocationTable table, String bootstrapServers) {
        return new Builder(Objects.requireNonNull(table, "table"), Args.notBlank("bootstrapServers", bootstrapServers));
    }

    /** The table this follower feeds. */
    public AllocationTable table() {
        return table;
    }

    /** The control topic followed. */
    public String topic() {
        return topic;
    }

    /** True once the table has read up to the end offsets seen at start (always true after a normal start). */
    public boolean caughtUp() {
        return loop.caughtUp();
    }

    /** True while the follower thread runs. */
    public boolean isRunning() {
        return thread.isAlive();
    }

    /**
     * Stops the thread and closes the consumer; waits up to 30 s. The table keeps its last contents (and goes
     * stale as their {@code validUntil} passes). Idempotent.
     */
    @Override
    public void close() {
        loop.stop();
        try {
            thread.join(JOIN_TIMEOUT.toMillis());
        } catch (InterruptedException e) {
            Thread.currentThread().interrupt();
        }
        if (thread.isAlive()) {
            LOG.warn("Follower of control topic '{}' did not stop within {}", topic, JOIN_TIMEOUT);
        }
    }

    private ControlTopicFollower startAndAwait(Duration timeout) {
        thread.start();
        boolean caughtUp;
        try {
            caughtUp = loop.awaitCaughtUp(timeout);
        } catch (InterruptedException e) {
            Thread.currentThread().interrupt();
            close();
            throw new CatchUpTimeoutException("interrupted while catching up with control topic '" + topic + "'", e);
        }
        if (!caughtUp) {
            RuntimeException last = loop.lastError();
            close();
            throw new CatchUpTimeoutException("not caught up with control topic '" + topic + "' within " + timeout
                    + (last == null ? "" : "; last error: " + last), last);
        }
        return this;
    }

    /** Describes a {@link ControlTopicFollower}. */
    public static final class Builder {
        private final AllocationTable table;
        private final Map<String, Object> consumerProperties = new HashMap<>();
        private String topic = DEFAULT_TOPIC;
        private Duration startupTimeout = Duration.ofSeconds(30);
        private Duration pollTimeout = Duration.ofMillis(500);
        private Duration errorBackoff = Duration.ofSeconds(1);
        private Duration partitionRefresh = Duration.ofMinutes(1);
        private Function<Map<String, Object>, Consumer<String, byte[]>> consumerFactory =
                props -> new KafkaConsumer<>(props, new StringDeserializer(), new ByteArrayDeserializer());

        private Builder(AllocationTable table, String bootstrapServers) {
            this.table = table;
            consumerProperties.put(ConsumerConfig.BOOTSTRAP_SERVERS_CONFIG, bootstrapServers);
            consumerProperties.put(ConsumerConfig.ENABLE_AUTO_COMMIT_CONFIG, "false");
            consumerProperties.put(ConsumerConfig.AUTO_OFFSET_RESET_CONFIG, "earliest");
            consumerProperties.put(ConsumerConfig.ISOLATION_LEVEL_CONFIG, "read_committed");
            consumerProperties.put(ConsumerConfig.CLIENT_ID_CONFIG, "runoff-control-follower");
        }

        /** Sets the control topic (default {@value ControlTopicFollower#DEFAULT_TOPIC}). */
        public Builder topic(String name) {
            this.topic = Args.notBlank("topic", name);
            return this;
        }

        /**
         * Sets a consumer property (security settings, client id, fetch sizes...). Deserializers are fixed
         * (string keys, byte-array values) and {@code group.id} is refused: the follower uses no group.
         *
         * @throws IllegalArgumentException for {@code group.id} or a blank name
         */
        public Builder consumerProperty(String name, Object value) {
            Args.notBlank("consumer property name", name);
            if (ConsumerConfig.GROUP_ID_CONFIG.equals(name)) {
                throw new IllegalArgumentException("consumer property group.id is not allowed (the follower "
                        + "assigns every partition itself and commits nothing), got '" + value + "'");
            }
            consumerProperties.put(name, Objects.requireNonNull(value, () -> "value of consumer property " + name));
            return this;
        }

        /** Sets how long {@link #start()} waits to catch up (default 30 s). */
        public Builder startupTimeout(Duration timeout) {
            this.startupTimeout = Args.positive("startupTimeout", timeout);
            return this;
        }

        /** Sets the longest wait of one poll (default 500 ms); also bounds how fast {@link #close()} is. */
        public Builder pollTimeout(Duration timeout) {
            this.pollTimeout = Args.positive("pollTimeout", timeout);
            return this;
        }

        /** Sets the pause after a failed poll (default 1 s). */
        public Builder errorBackoff(Duration backoff) {
            this.errorBackoff = Args.positive("errorBackoff", backoff);
            return this;
        }

        /**
         * Sets how often the partitions are listed again to pick up added ones (default 1 min); also the
         * consumer's {@code metadata.max.age.ms} unless set as a consumer property.
         */
        public Builder partitionRefresh(Duration interval) {
            this.partitionRefresh = Args.positive("partitionRefresh", interval);
            return this;
        }

        /** Replaces the consumer (tests use a {@code MockConsumer}). */
        Builder consumerFactory(Function<Map<String, Object>, Consumer<String, byte[]>> factory) {
            this.consumerFactory = Objects.requireNonNull(factory, "consumerFactory");
            return this;
        }

        /**
         * Creates the consumer, starts the follower thread and waits until the table has read the control
         * topic up to the end offsets it saw at start.
         *
         * @return the running follower
         * @throws CatchUpTimeoutException when that takes longer than the start-up timeout (the topic is
         *                                 missing, the cluster unreachable...); the follower is closed then
         */
        public ControlTopicFollower start() {
            FollowerTimings timings = new FollowerTimings(pollTimeout, errorBackoff, partitionRefresh,
                    Duration.ofSeconds(5));
            Map<String, Object> props = new HashMap<>(consumerProperties);
            // partitionsFor answers from cached metadata: refresh it as often as partitions are listed
            props.putIfAbsent(ConsumerConfig.METADATA_MAX_AGE_CONFIG, Long.toString(partitionRefresh.toMillis()));
            Consumer<String, byte[]> consumer = consumerFactory.apply(Map.copyOf(props));
            FollowLoop loop = new FollowLoop(consumer, topic, table, timings);
            return new ControlTopicFollower(table, topic, loop).startAndAwait(startupTimeout);
        }
    }
}
