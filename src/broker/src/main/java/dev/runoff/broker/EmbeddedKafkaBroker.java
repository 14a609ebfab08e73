package dev.runoff.broker;

import java.nio.file.Path;
import java.time.Duration;
import java.util.LinkedHashMap;
import java.util.Map;
import java.util.Objects;
import kafka.server.KafkaConfig;
import kafka.server.KafkaRaftServer;
import org.apache.kafka.common.utils.Time;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;

/**
 * A single-node KRaft Kafka broker (broker and controller roles in one {@code KafkaRaftServer}) running
 * inside this JVM, listening on 127.0.0.1 only. The client listener is plaintext unless a
 * {@link BrokerSecurity} secures it with TLS or SASL/SCRAM over TLS.
 *
 * <p>Typical use:
 * <pre>{@code
 * try (EmbeddedKafkaBroker broker = EmbeddedKafkaBroker.builder(dir).build().start()) {
 *     broker.createTopic("events", 3, Map.of());
 *     String bootstrap = broker.bootstrapServers();
 * }
 * }</pre>
 *
 * <p>{@link #start()} formats the directory only when it holds no {@code meta.properties}, so starting
 * again on the same directory (with this instance after {@link #close()}, or with a new one) keeps
 * topics, records and committed offsets. This instance keeps its ports across restarts, so clients
 * that remember {@link #bootstrapServers()} reconnect. Topics are never auto-created.
 *
 * <p>A fatal fault inside the broker makes Kafka halt the whole JVM through its internal exit hook;
 * one such fault is a CONTROLLER listener that cannot bind its port. {@link #start()} therefore probes
 * both ports before handing them to Kafka, which leaves only the moment between probe and bind open
 * to another process. A normal {@link #close()} does not halt. Run the broker in a separate process
 * where a halt would matter.
 *
 * <p>Instances are thread-safe; {@code start} and {@code close} are serialized.
 */
public final class EmbeddedKafkaBroker implements AutoCloseable {
    private static final Logger LOG = LoggerFactory.getLogger(EmbeddedKafkaBroker.class);
    private static final long BIND_RETRY_PAUSE_MS = 200;

    private final Path logDirectory;
    private final Map<String, String> overrides;
    private final BrokerSecurity security;
    private final Duration startTimeout;
    private final Time time;
    private BrokerPorts ports;
    private boolean portsFixed;
    private KafkaRaftServer server;
    private String clusterId;

    private EmbeddedKafkaBroker(Builder builder) {
        this.logDirectory = builder.logDirectory;
        this.overrides = Map.copyOf(builder.overrides);
        this.security = builder.security;
        this.startTimeout = builder.startTimeout;
        this.time = builder.time;
        this.ports = builder.ports;
        this.portsFixed = builder.ports != null;
    }

    /**
     * Starts describing a broker whose metadata and topic data live in {@code logDirectory}.
     *
     * @param logDirectory the broker's only log directory; created and formatted on first start
     * @return a builder with free ports, a 60 s start timeout and the system clock
     */
    public static Builder builder(Path logDirectory) {
        return new Builder(Objects.requireNonNull(logDirectory, "logDirectory"));
    }

    /**
     * Formats the log directory if needed, starts the broker and waits until it answers an admin
     * request. Both ports are probed first; if a listener cannot bind, the start is retried once: on
     * new free ports when the ports were picked automatically and this instance never ran, otherwise on
     * the same ports after a short pause.
     *
     * @return this broker, running
     * @throws IllegalStateException if this broker is already running
     * @throws EmbeddedBrokerException if formatting, binding or the readiness probe fails
     */
    public synchronized EmbeddedKafkaBroker start() {
        if (server != null) {
            throw new IllegalStateException("broker on " + logDirectory + " is already running at "
                    + bootstrapServers());
        }
        long began = time.milliseconds();
        boolean formatted = StorageFormat.formatIfAbsent(logDirectory,
                security == null ? java.util.List.of() : security.scramArguments());
        server = launchWithOneRetry();
        portsFixed = true;
        clusterId = awaitReady();
        LOG.info("Kafka broker started in {} ms on {} ({}, {}, {})", time.milliseconds() - began,
                ports.describe(BrokerProperties.clientListener(security)), security == null ? "PLAINTEXT" : security,
                formatted ? "formatted " + logDirectory : "reused " + logDirectory, "cluster " + clusterId);
        return this;
    }

    /**
     * Shuts the broker down and waits until it has stopped. Does nothing if it is not running.
     * The broker can be started again afterwards, on the same directory and ports.
     */
    @Override
    public synchronized void close() {
        if (server == null) {
            return;
        }
        long began = time.milliseconds();
        KafkaRaftServer stopping = server;
        server = null;
        stopping.shutdown();
        stopping.awaitShutdown();
        LOG.info("Kafka broker on {} stopped in {} ms", ports, time.milliseconds() - began);
    }

    /** Stops and starts the broker on the same directory and ports. */
    public synchronized EmbeddedKafkaBroker restart() {
        close();
        return start();
    }

    /**
     * Returns {@code 127.0.0.1:port} of the client listener.
     *
     * @throws IllegalStateException before the first start when no port was given
     */
    public synchronized String bootstrapServers() {
        if (ports == null) {
            throw new IllegalStateException("broker on " + logDirectory + " has no port yet: start it first");
        }
        return ports.bootstrapServers();
    }

    /**
     * The security of the client listener, or {@code null} when it is plaintext. Its
     * {@link BrokerSecurity#clientProperties} tell a client how to connect.
     */
    public BrokerSecurity security() {
        return security;
    }

    /**
     * Creates or replaces a SCRAM user (through the Admin API's {@code alterUserScramCredentials}, 4096
     * iterations) for the mechanism of this broker's {@link BrokerSecurity}.
     *
     * @throws IllegalStateException if the broker is not running or its listener does not use SCRAM
     * @throws IllegalArgumentException naming a user or password outside {@code [A-Za-z0-9._~-]+}
     * @throws EmbeddedBrokerException if the broker refuses
     */
    public void addScramUser(String user, String password) {
        if (security == null || security.scramMechanism() == null) {
            throw new IllegalStateException("broker on " + logDirectory + " does not use SASL/SCRAM: cannot add user '"
                    + user + "'");
        }
        BrokerSecurity.checkToken("user", user, true);
        BrokerSecurity.checkToken("password", password, false);
        if (!isRunning()) {
            throw new IllegalStateException("broker on " + logDirectory + " is not running: cannot add user '"
                    + user + "'");
        }
        admin().upsertScramUser(security.scramMechanism(), user, password);
    }

    /** Tells whether the broker is running. */
    public synchronized boolean isRunning() {
        return server != null;
    }

    /** Returns the broker's log directory. */
    public Path logDirectory() {
        return logDirectory;
    }

    /**
     * Returns the cluster id written when the directory was formatted, as reported by the running
     * broker.
     *
     * @throws IllegalStateException before the first start
     */
    public synchronized String clusterId() {
        if (clusterId == null) {
            throw new IllegalStateException("broker on " + logDirectory + " has not started yet");
        }
        return clusterId;
    }

    /**
     * Creates a topic with replication factor 1.
     *
     * @param name the topic name
     * @param partitions number of partitions, at least 1
     * @param config topic configuration, e.g. {@code cleanup.policy=compact}
     * @throws IllegalStateException if the broker is not running or the topic already exists
     * @throws EmbeddedBrokerException if the broker rejects the topic
     */
    public void createTopic(String name, int partitions, Map<String, String> config) {
        checkedAdmin(name, partitions).createTopic(name, partitions, Map.copyOf(config), true);
    }

    /**
     * Creates a topic with replication factor 1 unless a topic of that name exists (its partition
     * count and configuration are then left as they are).
     *
     * @return {@code true} if the topic was created, {@code false} if it already existed
     * @throws IllegalStateException if the broker is not running
     * @throws EmbeddedBrokerException if the broker rejects the topic
     */
    public boolean createTopicIfAbsent(String name, int partitions, Map<String, String> config) {
        return checkedAdmin(name, partitions).createTopic(name, partitions, Map.copyOf(config), false);
    }

    private BrokerAdmin checkedAdmin(String name, int partitions) {
        if (name == null || name.isBlank()) {
            throw new IllegalArgumentException("topic name must not be blank, got '" + name + "'");
        }
        if (partitions < 1) {
            throw new IllegalArgumentException("partitions of topic '" + name + "' must be >= 1, got "
                    + partitions);
        }
        if (!isRunning()) {
            throw new IllegalStateException("broker on " + logDirectory + " is not running: cannot create topic '"
                    + name + "'");
        }
        return admin();
    }

    private BrokerAdmin admin() {
        Map<String, String> client = security == null ? Map.of() : security.brokerClientProperties();
        return new BrokerAdmin(ports.bootstrapServers(), client, startTimeout, time);
    }

    private KafkaRaftServer launchWithOneRetry() {
        if (ports == null) {
            ports = BrokerPorts.pickFree();
        }
        try {
            return launchIfBindable();
        } catch (BindFailure first) {
            LOG.warn("Kafka broker for {} {}; retrying once", logDirectory, first.getMessage());
            return retryAfter(first);
        }
    }

    private KafkaRaftServer retryAfter(BindFailure first) {
        if (portsFixed) {
            time.sleep(BIND_RETRY_PAUSE_MS);
        } else {
            ports = BrokerPorts.pickFree();
        }
        try {
            return launchIfBindable();
        } catch (BindFailure second) {
            second.addSuppressed(first);
            throw new EmbeddedBrokerException(second.getMessage() + " (broker on " + logDirectory
                    + ", 2 attempts)", second);
        }
    }

    private KafkaRaftServer launchIfBindable() throws BindFailure {
        ports.probe();
        try {
            return launch();
        } catch (RuntimeException e) {
            if (BindFailure.isCauseOf(e)) {
                throw new BindFailure(ports.toString(), e);
            }
            throw new EmbeddedBrokerException("could not start broker on " + logDirectory + " (" + ports
                    + "): " + e.getMessage(), e);
        }
    }

    private KafkaRaftServer launch() {
        Map<String, String> props = BrokerProperties.of(logDirectory, ports, security, overrides);
        KafkaRaftServer candidate = new KafkaRaftServer(new KafkaConfig(props, false), time);
        try {
            candidate.startup();
            return candidate;
        } catch (RuntimeException e) {
            stopQuietly(candidate, e);
            throw e;
        }
    }

    private String awaitReady() {
        try {
            return admin().awaitNode(BrokerProperties.NODE_ID);
        } catch (RuntimeException e) {
            KafkaRaftServer failed = server;
            server = null;
            stopQuietly(failed, e);
            throw e;
        }
    }

    private static void stopQuietly(KafkaRaftServer server, RuntimeException cause) {
        try {
            server.shutdown();
            server.awaitShutdown();
        } catch (RuntimeException e) {
            cause.addSuppressed(e);
        }
    }

    /** Describes an {@link EmbeddedKafkaBroker} before it is built. */
    public static final class Builder {
        private final Path logDirectory;
        private final Map<String, String> overrides = new LinkedHashMap<>();
        private BrokerPorts ports;
        private BrokerSecurity security;
        private Duration startTimeout = Duration.ofSeconds(60);
        private Time time = Time.SYSTEM;

        private Builder(Path logDirectory) {
            this.logDirectory = logDirectory;
        }

        /**
         * Uses fixed ports instead of free ones picked at start.
         *
         * @param brokerPort port of the PLAINTEXT client listener, in [1, 65535]
         * @param controllerPort port of the KRaft CONTROLLER listener, in [1, 65535], not {@code brokerPort}
         */
        public Builder ports(int brokerPort, int controllerPort) {
            this.ports = new BrokerPorts(brokerPort, controllerPort);
            return this;
        }

        /**
         * Sets a broker property, replacing the default of the same name (for example
         * {@code log.cleaner.backoff.ms} in a test that waits for compaction).
         */
        public Builder property(String name, String value) {
            if (name == null || name.isBlank()) {
                throw new IllegalArgumentException("broker property name must not be blank, got '" + name + "'");
            }
            overrides.put(name, Objects.requireNonNull(value, () -> "value of broker property " + name));
            return this;
        }

        /**
         * Secures the client listener with TLS, or SASL/SCRAM over TLS (default: plaintext). The listener is
         * then named after its protocol ({@code SSL} or {@code SASL_SSL}) and plaintext clients are refused.
         */
        public Builder security(BrokerSecurity listenerSecurity) {
            this.security = Objects.requireNonNull(listenerSecurity, "security");
            return this;
        }

        /**
         * Sets how long {@link #start()} waits for the broker to answer and how long admin calls may take.
         *
         * @param timeout a positive duration
         */
        public Builder startTimeout(Duration timeout) {
            if (timeout == null || timeout.isNegative() || timeout.isZero()) {
                throw new IllegalArgumentException("startTimeout must be positive, got " + timeout);
            }
            this.startTimeout = timeout;
            return this;
        }

        /** Sets the clock the broker and the readiness probe use (default: the system clock). */
        public Builder time(Time clock) {
            this.time = Objects.requireNonNull(clock, "time");
            return this;
        }

        /** Builds the broker, not yet started. */
        public EmbeddedKafkaBroker build() {
            return new EmbeddedKafkaBroker(this);
        }
    }
}
