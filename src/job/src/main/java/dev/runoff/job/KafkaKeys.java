package dev.runoff.job;

import java.util.List;
import java.util.Locale;
import java.util.Optional;
import org.apache.kafka.clients.admin.AdminClientConfig;
import org.apache.kafka.clients.consumer.ConsumerConfig;
import org.apache.kafka.clients.producer.ProducerConfig;
import org.apache.kafka.common.config.ConfigDef;
import org.apache.kafka.common.config.ConfigException;
import org.apache.kafka.streams.StreamsConfig;

/**
 * The Kafka Streams and client settings the job passes through: which keys exist, and whether a value
 * parses and passes the key's own validator. Checks one key at a time, so a configuration with several
 * mistakes gets one message per mistake, and never touches the network (no name resolution).
 */
final class KafkaKeys {

    /** A prefix that routes a client setting to one kind of client, with that client's definitions. */
    private record Prefix(String prefix, ConfigDef def) {
    }

    private static final ConfigDef STREAMS = StreamsConfig.configDef();
    private static final ConfigDef PRODUCER = ProducerConfig.configDef();
    private static final ConfigDef CONSUMER = ConsumerConfig.configDef();
    private static final ConfigDef ADMIN = AdminClientConfig.configDef();
    private static final List<ConfigDef> UNPREFIXED = List.of(STREAMS, PRODUCER, CONSUMER, ADMIN);
    private static final List<Prefix> PREFIXES = List.of(
            new Prefix(StreamsConfig.MAIN_CONSUMER_PREFIX, CONSUMER),
            new Prefix(StreamsConfig.RESTORE_CONSUMER_PREFIX, CONSUMER),
            new Prefix(StreamsConfig.GLOBAL_CONSUMER_PREFIX, CONSUMER),
            new Prefix(StreamsConfig.CONSUMER_PREFIX, CONSUMER),
            new Prefix(StreamsConfig.PRODUCER_PREFIX, PRODUCER),
            new Prefix(StreamsConfig.ADMIN_CLIENT_PREFIX, ADMIN));
    /** Prefixes whose keys Kafka Streams passes on without a fixed list (topic settings, client tags). */
    private static final List<String> OPEN_PREFIXES = List.of(StreamsConfig.TOPIC_PREFIX,
            StreamsConfig.CLIENT_TAG_PREFIX);

    private KafkaKeys() {
    }

    /** Every plain Kafka Streams, producer, consumer and admin client key (for "did you mean"). */
    static java.util.Set<String> names() {
        java.util.Set<String> names = new java.util.TreeSet<>();
        UNPREFIXED.forEach(def -> names.addAll(def.names()));
        return names;
    }

    /** Whether {@code key} is a Kafka Streams or client setting, plain or with a client prefix. */
    static boolean isKnown(String key) {
        return definition(key).isPresent() || OPEN_PREFIXES.stream().anyMatch(p -> key.startsWith(p)
                && key.length() > p.length());
    }

    /** Whether the value of {@code key} is secret (a password type), so it never appears in a message. */
    static boolean isSecret(String key) {
        return definition(key).map(k -> k.type == ConfigDef.Type.PASSWORD).orElse(false)
                || key.toLowerCase(Locale.ROOT).contains("password") || key.endsWith("jaas.config");
    }

    /**
     * The problem with {@code key = value}, if any: an unknown key, or a value of the wrong type or outside
     * the key's allowed values. Secret values are not quoted.
     */
    static Optional<String> problem(String key, String value) {
        Optional<ConfigDef.ConfigKey> def = definition(key);
        if (def.isEmpty()) {
            return isKnown(key) ? Optional.empty() : Optional.of("unknown setting (not a Kafka Streams, producer, "
                    + "consumer or admin client key, nor one of the job's runoff.* keys)");
        }
        ConfigDef.ConfigKey k = def.get();
        try {
            Object parsed = ConfigDef.parseType(k.name, value, k.type);
            if (k.validator != null) {
                k.validator.ensureValid(k.name, parsed);
            }
            return Optional.empty();
        } catch (ConfigException e) {
            String shown = isSecret(key) ? "(secret value hidden)" : "'" + value + "'";
            return Optional.of("invalid value " + shown + ": expected " + describe(k) + reason(e, value, key));
        }
    }

    private static String describe(ConfigDef.ConfigKey k) {
        String type = k.type.toString().toLowerCase(Locale.ROOT);
        return k.validator == null ? type : type + ": " + k.validator;
    }

    private static String reason(ConfigException e, String value, String key) {
        String message = e.getMessage();
        if (message == null || isSecret(key) && message.contains(value)) {
            return "";
        }
        return " (" + message + ")";
    }

    private static Optional<ConfigDef.ConfigKey> definition(String key) {
        for (ConfigDef def : UNPREFIXED) {
            ConfigDef.ConfigKey k = def.configKeys().get(key);
            if (k != null) {
                return Optional.of(k);
            }
        }
        for (Prefix p : PREFIXES) {
            if (key.startsWith(p.prefix())) {
                return Optional.ofNullable(p.def().configKeys().get(key.substring(p.prefix().length())));
            }
        }
        return Optional.empty();
    }
}
