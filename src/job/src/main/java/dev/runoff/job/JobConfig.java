package dev.runoff.job;

import dev.runoff.topology.OversizeGuard;
import dev.runoff.topology.TopologySettings;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.Collections;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.Objects;
import java.util.Optional;
import java.util.Properties;
import java.util.Set;
import java.util.regex.Pattern;
import org.apache.kafka.clients.admin.AdminClientConfig;
import org.apache.kafka.clients.consumer.ConsumerConfig;
import org.apache.kafka.clients.producer.ProducerConfig;
import org.apache.kafka.streams.StreamsConfig;

/**
 * The validated configuration of the job: the Kafka settings it passes through unchanged (every Kafka
 * Streams, producer, consumer and admin client key, plain or with Kafka Streams' client prefixes), the
 * topology's {@code runoff.*} settings ({@link TopologySettings}) and the application's ({@link AppSettings}).
 *
 * <p>{@link #load} checks everything before anything talks to Kafka and reports every problem at once.
 */
public final class JobConfig {

    /** Application id used when the configuration names none. */
    public static final String DEFAULT_APPLICATION_ID = "runoff";

    private static final String RUNOFF_PREFIX = "runoff.";
    private static final Pattern HOST_PORT = Pattern.compile("^(\\[[0-9a-fA-F:.]+\\]|[^\\s:,\\[\\]]+):(\\d{1,5})$");

    private final Map<String, String> kafka;
    private final TopologySettings topology;
    private final AppSettings app;
    private final SigningSettings signing;
    private final SafetySettings safety;
    private final List<String> ignored;

    private JobConfig(Map<String, String> kafka, TopologySettings topology, AppSettings app, SigningSettings signing,
                      SafetySettings safety, List<String> ignored) {
        this.kafka = Collections.unmodifiableMap(new LinkedHashMap<>(kafka));
        this.topology = topology;
        this.app = app;
        this.signing = signing;
        this.safety = safety;
        this.ignored = List.copyOf(ignored);
    }

    /**
     * Loads {@code file} (may be {@code null}), applies the environment on top (see {@link ConfigSources}),
     * then {@code overrides} (command-line options, source "command line"), and validates the result.
     *
     * @param requireBootstrap whether {@code bootstrap.servers} must be set
     * @throws InvalidConfigException listing every problem
     */
    public static JobConfig load(Path file, Map<String, String> env, Map<String, String> overrides,
                                 boolean requireBootstrap) {
        ConfigSources.Loaded loaded = ConfigSources.load(file, env);
        Map<String, Setting> settings = new LinkedHashMap<>(loaded.settings());
        overrides.forEach((k, v) -> settings.put(k, new Setting(k, v.trim(), "command line")));
        return validate(settings, loaded.problems(), loaded.ignored(), requireBootstrap);
    }

    /** A configuration from {@code values} alone (no file, no environment), e.g. for the demo. */
    public static JobConfig of(Map<String, String> values) {
        Map<String, Setting> settings = new LinkedHashMap<>();
        values.forEach((k, v) -> settings.put(k, new Setting(k, v, "settings")));
        return validate(settings, List.of(), List.of(), true);
    }

    private static JobConfig validate(Map<String, Setting> settings, List<String> fileProblems, List<String> ignored,
                                      boolean requireBootstrap) {
        List<String> problems = new ArrayList<>(fileProblems);
        Map<String, String> kafka = new LinkedHashMap<>();
        Map<String, String> topologyKeys = new LinkedHashMap<>();
        Map<String, String> appKeys = new LinkedHashMap<>();
        Map<String, String> signingKeys = new LinkedHashMap<>();
        Map<String, String> safetyKeys = new LinkedHashMap<>();
        for (Setting s : settings.values()) {
            if (SigningSettings.KEYS.contains(s.key())) {
                signingKeys.put(s.key(), s.value());
            } else if (SafetySettings.KEYS.contains(s.key())) {
                safetyKeys.put(s.key(), s.value());
            } else if (AppSettings.KEYS.contains(s.key())) {
                appKeys.put(s.key(), s.value());
            } else if (s.key().startsWith(RUNOFF_PREFIX)) {
                topologyKeys.put(s.key(), s.value());
                topologyProblem(Map.of(s.key(), s.value())).ifPresent(p -> problems.add(at(s, p + suggestion(p, s))));
            } else {
                kafka.put(s.key(), s.value());
                KafkaKeys.problem(s.key(), s.value()).ifPresent(p -> problems.add(at(s, s.key() + ": " + p
                        + suggestion(p, s))));
            }
        }
        AppSettings app = AppSettings.from(appKeys, p -> problems.add(at(settings.get(keyOf(p)), p)));
        SigningSettings signing = SigningSettings.from(signingKeys, p -> problems.add(at(settings.get(keyOf(p)), p)));
        SafetySettings safety = SafetySettings.from(safetyKeys, kafka, p -> problems.add(at(settings.get(keyOf(p)), p)));
        TopologySettings topology = null;
        if (problems.isEmpty()) {
            try {
                topology = TopologySettings.fromMap(topologyKeys);
            } catch (IllegalArgumentException e) {
                problems.add(e.getMessage());
            }
        }
        checkKafkaValues(settings, requireBootstrap, problems);
        if (!problems.isEmpty()) {
            throw new InvalidConfigException(problems);
        }
        kafka.putIfAbsent(StreamsConfig.APPLICATION_ID_CONFIG, DEFAULT_APPLICATION_ID);
        return new JobConfig(kafka, topology, app, signing, safety, ignored);
    }

    private static Optional<String> topologyProblem(Map<String, String> one) {
        try {
            TopologySettings.fromMap(one);
            return Optional.empty();
        } catch (IllegalArgumentException e) {
            String message = e.getMessage();
            return Optional.of(message.startsWith("unknown setting")
                    ? message + "; the application's own keys are " + AppSettings.KEYS + " and " + SigningSettings.KEYS
                    : message);
        }
    }

    /** {@code "; did you mean K?"} when {@code problem} is an unknown key and a known key K is a near miss. */
    private static String suggestion(String problem, Setting s) {
        if (!problem.startsWith("unknown setting")) {
            return "";
        }
        return NearMiss.closest(s.key(), knownKeys()).map(k -> "; did you mean " + k + "?").orElse("");
    }

    /** Every key the job knows: its own runoff.* keys and the plain Kafka keys. */
    static Set<String> knownKeys() {
        Set<String> keys = new java.util.LinkedHashSet<>(AppSettings.KEYS);
        keys.addAll(SigningSettings.KEYS);
        keys.addAll(SafetySettings.KEYS);
        for (java.lang.reflect.Field f : TopologySettings.class.getFields()) {
            if (java.lang.reflect.Modifier.isStatic(f.getModifiers()) && f.getType() == String.class
                    && f.getName().endsWith("_KEY")) {
                try {
                    keys.add((String) f.get(null));
                } catch (IllegalAccessException e) {
                    throw new IllegalStateException(e);
                }
            }
        }
        keys.addAll(KafkaKeys.names());
        return keys;
    }

    /** The key a message of {@link AppSettings#from} starts with. */
    private static String keyOf(String message) {
        int space = message.indexOf(' ');
        return space < 0 ? message : message.substring(0, space);
    }

    private static String at(Setting setting, String message) {
        return setting == null ? message : message + " (from " + setting.source() + ")";
    }

    private static void checkKafkaValues(Map<String, Setting> settings, boolean requireBootstrap,
                                         List<String> problems) {
        Setting bootstrap = settings.get(StreamsConfig.BOOTSTRAP_SERVERS_CONFIG);
        if (bootstrap == null || bootstrap.value().isBlank()) {
            if (requireBootstrap) {
                problems.add(StreamsConfig.BOOTSTRAP_SERVERS_CONFIG + " is required: the brokers to connect to, "
                        + "e.g. bootstrap.servers=kafka-0.kafka:9092 (or KAFKA_BOOTSTRAP_SERVERS)");
            }
        } else {
            for (String address : bootstrap.value().split(",")) {
                if (!validHostPort(address.trim())) {
                    problems.add(at(bootstrap, StreamsConfig.BOOTSTRAP_SERVERS_CONFIG + ": '" + address.trim()
                            + "' is not host:port with a port in [1, 65535]"));
                }
            }
        }
        Setting stateDir = settings.get(StreamsConfig.STATE_DIR_CONFIG);
        if (stateDir != null && !writableDirectory(Path.of(stateDir.value()))) {
            problems.add(at(stateDir, StreamsConfig.STATE_DIR_CONFIG + ": '" + stateDir.value()
                    + "' is neither a writable directory nor creatable under one"));
        }
    }

    static boolean validHostPort(String address) {
        var m = HOST_PORT.matcher(address);
        if (!m.matches()) {
            return false;
        }
        int port = Integer.parseInt(m.group(2));
        return port >= 1 && port <= 65_535;
    }

    private static boolean writableDirectory(Path dir) {
        Path p = dir.toAbsolutePath();
        while (p != null && !Files.exists(p)) {
            p = p.getParent();
        }
        return p != null && Files.isDirectory(p) && Files.isWritable(p);
    }

    /** The topology's settings. */
    public TopologySettings topology() {
        return topology;
    }

    /** The signing settings; the key itself is read by {@link SigningSettings#signer()} at start. */
    public SigningSettings signing() {
        return signing;
    }

    /** The application's settings. */
    public AppSettings app() {
        return app;
    }

    /** The settings of the endpoint's exposure, thread replacements and processing guarantee. */
    public SafetySettings safety() {
        return safety;
    }

    /** Every Kafka setting (keys that are not {@code runoff.*}), with {@code application.id} defaulted. */
    public Map<String, String> kafka() {
        return kafka;
    }

    /** Environment variables that were ignored, with the reason (for a start-up log line). */
    public List<String> ignored() {
        return ignored;
    }

    /** The {@code bootstrap.servers} setting, or {@code null}. */
    public String bootstrapServers() {
        return kafka.get(StreamsConfig.BOOTSTRAP_SERVERS_CONFIG);
    }

    /** The {@code application.id}. */
    public String applicationId() {
        return kafka.get(StreamsConfig.APPLICATION_ID_CONFIG);
    }

    /**
     * The settings handed to {@code RunoffTopology.streamsConfig} as overrides: every Kafka key, the
     * bounded RocksDB memory setter (unless {@code rocksdb.config.setter} is set) and its two sizes, and the
     * {@link DecisionLog} interceptor on the producers (after any configured ones).
     */
    public Map<String, Object> streamsOverrides() {
        Map<String, Object> out = new LinkedHashMap<>(kafka);
        out.putIfAbsent(StreamsConfig.ROCKSDB_CONFIG_SETTER_CLASS_CONFIG, BoundedRocksDbConfig.class.getName());
        String interceptors = StreamsConfig.producerPrefix(ProducerConfig.INTERCEPTOR_CLASSES_CONFIG);
        String configured = kafka.get(interceptors);
        out.put(interceptors, (configured == null || configured.isBlank() ? DecisionLog.class.getName()
                : configured + "," + DecisionLog.class.getName()) + "," + OversizeGuard.class.getName());
        out.put(StreamsConfig.producerPrefix(OversizeGuard.REJECTED_KEY), topology.rejectedTopic());
        out.put(StreamsConfig.producerPrefix(OversizeGuard.OUTPUTS_KEY), OversizeGuard.outputs(topology));
        out.put(StreamsConfig.producerPrefix(DecisionLog.TOPIC_KEY), topology.decisionsTopic());
        out.put(AppSettings.ROCKSDB_CACHE_KEY, app.rocksDbCacheBytes());
        out.put(AppSettings.MEMTABLE_KEY, app.memtableBytes());
        return out;
    }

    /** Kinds of plain Kafka client the commands use. */
    public enum Client {
        /** A producer. */
        PRODUCER(ProducerConfig.configNames(), StreamsConfig.PRODUCER_PREFIX),
        /** A consumer. */
        CONSUMER(ConsumerConfig.configNames(), StreamsConfig.CONSUMER_PREFIX),
        /** An admin client. */
        ADMIN(AdminClientConfig.configNames(), StreamsConfig.ADMIN_CLIENT_PREFIX);

        private final Set<String> names;
        private final String prefix;

        Client(Set<String> names, String prefix) {
            this.names = names;
            this.prefix = prefix;
        }
    }

    /**
     * Settings for a plain client of kind {@code client}: the keys that client knows, then the keys with
     * its Kafka Streams prefix ({@code producer.}, {@code consumer.}, {@code admin.}) with the prefix removed.
     */
    public Properties clientProperties(Client client) {
        Objects.requireNonNull(client, "client");
        Properties props = new Properties();
        kafka.forEach((key, value) -> {
            if (client.names.contains(key)) {
                props.put(key, value);
            }
        });
        kafka.forEach((key, value) -> {
            if (key.startsWith(client.prefix) && client.names.contains(key.substring(client.prefix.length()))) {
                props.put(key.substring(client.prefix.length()), value);
            }
        });
        return props;
    }
}
