package dev.runoff.job;

import java.io.IOException;
import java.io.Reader;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.LinkedHashSet;
import java.util.List;
import java.util.Locale;
import java.util.Map;
import java.util.Properties;
import java.util.Set;
import java.util.TreeMap;

/**
 * Reads the job's settings from a properties file, then lets environment variables override them:
 * {@code RUNOFF_X_Y} sets {@code runoff.x.y} and {@code KAFKA_X_Y} sets {@code x.y} (lower case, each
 * underscore a dot), e.g. {@code RUNOFF_TOPIC_OUTCOMES} sets {@code runoff.topic.outcomes} and
 * {@code KAFKA_BOOTSTRAP_SERVERS} sets {@code bootstrap.servers}. Every {@code RUNOFF_} variable is a setting
 * (a misspelt one is reported like a misspelt key); a {@code KAFKA_} variable that names no Kafka client or
 * Streams setting (such as {@code KAFKA_HOME} or {@code KAFKA_OPTS}) is ignored and listed in
 * {@link Loaded#ignored()}.
 */
final class ConfigSources {

    /** Prefix of environment variables that set job keys. */
    static final String RUNOFF_ENV = "RUNOFF_";
    /** Prefix of environment variables that set Kafka keys. */
    static final String KAFKA_ENV = "KAFKA_";

    /**
     * The merged settings.
     *
     * @param settings by key, file order first, then variables in name order
     * @param problems a file that cannot be read
     * @param ignored  environment variables that were not used, with the reason
     */
    record Loaded(Map<String, Setting> settings, List<String> problems, List<String> ignored) {
    }

    private ConfigSources() {
    }

    /** Reads {@code file} (may be {@code null}: no file) and applies {@code env} on top. */
    static Loaded load(Path file, Map<String, String> env) {
        Map<String, Setting> settings = new LinkedHashMap<>();
        List<String> problems = new ArrayList<>();
        if (file != null) {
            readFile(file, settings, problems);
        }
        List<String> ignored = new ArrayList<>();
        new TreeMap<>(env).forEach((name, value) -> applyVariable(name, value, settings, ignored));
        return new Loaded(settings, problems, ignored);
    }

    /** The key an environment variable sets, or {@code null} when it sets none. */
    static String keyOf(String variable) {
        if (variable.startsWith(RUNOFF_ENV) && variable.length() > RUNOFF_ENV.length()) {
            return "runoff." + dotted(variable.substring(RUNOFF_ENV.length()));
        }
        if (variable.startsWith(KAFKA_ENV) && variable.length() > KAFKA_ENV.length()) {
            return dotted(variable.substring(KAFKA_ENV.length()));
        }
        return null;
    }

    private static String dotted(String rest) {
        return rest.toLowerCase(Locale.ROOT).replace('_', '.');
    }

    private static void applyVariable(String name, String value, Map<String, Setting> settings, List<String> ignored) {
        String key = keyOf(name);
        if (key == null) {
            return;
        }
        if (name.startsWith(KAFKA_ENV) && !KafkaKeys.isKnown(key)) {
            ignored.add(name + " (" + key + " is not a Kafka client or Streams setting)");
            return;
        }
        settings.put(key, new Setting(key, value.trim(), "environment variable " + name));
    }

    private static void readFile(Path file, Map<String, Setting> settings, List<String> problems) {
        if (Files.isDirectory(file)) {
            problems.add("config file: is a directory: " + file);
            return;
        }
        if (!Files.exists(file)) {
            problems.add("config file: no such file: " + file);
            return;
        }
        Properties props = new OrderedProperties();
        try (Reader reader = Files.newBufferedReader(file, StandardCharsets.UTF_8)) {
            props.load(reader);
        } catch (IOException | IllegalArgumentException e) {
            problems.add("config file " + file + ": cannot be read: " + e.getMessage());
            return;
        }
        String source = String.valueOf(file.getFileName());
        for (String key : props.stringPropertyNames()) {
            settings.put(key, new Setting(key, props.getProperty(key).trim(), source));
        }
    }

    /** Properties that list their keys in file order, so messages follow the file. */
    private static final class OrderedProperties extends Properties {
        private final List<String> order = new ArrayList<>();

        @Override
        public synchronized Object put(Object key, Object value) {
            if (!containsKey(key)) {
                order.add((String) key);
            }
            return super.put(key, value);
        }

        @Override
        public Set<String> stringPropertyNames() {
            return new LinkedHashSet<>(order);
        }
    }
}
