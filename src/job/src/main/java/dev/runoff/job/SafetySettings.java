package dev.runoff.job;

import java.io.IOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.List;
import java.util.Map;
import java.util.Optional;
import java.util.function.Consumer;
import org.apache.kafka.streams.StreamsConfig;

/**
 * The settings that decide how the job faces production: who may reach its HTTP endpoint, how often a
 * failing stream thread is replaced before the job gives up, and whether a weaker processing guarantee than
 * exactly-once was accepted on purpose.
 *
 * @param httpBindAddress        address the HTTP endpoint listens on ({@value #BIND_ADDRESS_KEY}, default
 *                               {@value #BIND_ADDRESS}: this host only; a pod sets {@code 0.0.0.0})
 * @param httpToken              bearer token required for every path but {@code /health} and {@code /ready};
 *                               empty: none ({@value #TOKEN_KEY}, set it from the environment variable
 *                               {@code RUNOFF_HTTP_TOKEN}, or {@value #TOKEN_FILE_KEY}: a file holding it).
 *                               Never logged: {@link #toString()} hides it
 * @param maxThreadReplacements  stream-thread replacements allowed within the window; one more and the job
 *                               stops with {@code /health} DOWN and a non-zero exit ({@value #REPLACEMENTS_KEY},
 *                               default {@value #MAX_REPLACEMENTS})
 * @param replacementWindowMs    the window of that count ({@value #REPLACEMENT_WINDOW_KEY}, default
 *                               {@value #REPLACEMENT_WINDOW_MS})
 * @param atLeastOnceAccepted    whether {@code processing.guarantee=at_least_once} was acknowledged
 *                               ({@value #AT_LEAST_ONCE_KEY}, default false: the job refuses to start with it)
 */
public record SafetySettings(String httpBindAddress, Optional<String> httpToken, int maxThreadReplacements,
                             long replacementWindowMs, boolean atLeastOnceAccepted) {

    /** Key of {@link #httpBindAddress()}. */
    public static final String BIND_ADDRESS_KEY = "runoff.http.bind.address";
    /** Key of {@link #httpToken()} given directly (from {@code RUNOFF_HTTP_TOKEN}). */
    public static final String TOKEN_KEY = "runoff.http.token";
    /** Key of a file holding {@link #httpToken()} (e.g. a mounted Secret). */
    public static final String TOKEN_FILE_KEY = "runoff.http.token.file";
    /** Key of {@link #maxThreadReplacements()}. */
    public static final String REPLACEMENTS_KEY = "runoff.thread.replacements.max";
    /** Key of {@link #replacementWindowMs()}. */
    public static final String REPLACEMENT_WINDOW_KEY = "runoff.thread.replacements.window.ms";
    /** Key of {@link #atLeastOnceAccepted()}. */
    public static final String AT_LEAST_ONCE_KEY = "runoff.processing.at.least.once.acknowledged";
    /** Every key of this record. */
    public static final List<String> KEYS = List.of(BIND_ADDRESS_KEY, TOKEN_KEY, TOKEN_FILE_KEY, REPLACEMENTS_KEY,
            REPLACEMENT_WINDOW_KEY, AT_LEAST_ONCE_KEY);

    /** Default of {@link #httpBindAddress()}: loopback. */
    public static final String BIND_ADDRESS = "127.0.0.1";
    /** Default of {@link #maxThreadReplacements()}. */
    public static final int MAX_REPLACEMENTS = 3;
    /** Default of {@link #replacementWindowMs()}: ten minutes. */
    public static final long REPLACEMENT_WINDOW_MS = 600_000L;

    private static final String AT_LEAST_ONCE = "at_least_once";

    /** Checks the values; messages name the key. */
    public SafetySettings {
        if (httpBindAddress == null || httpBindAddress.isBlank()) {
            throw new IllegalArgumentException(BIND_ADDRESS_KEY + " must name an address, got '" + httpBindAddress + "'");
        }
        if (httpToken == null || httpToken.isPresent() && httpToken.get().isBlank()) {
            throw new IllegalArgumentException(TOKEN_KEY + " must not be blank");
        }
        if (maxThreadReplacements < 0) {
            throw new IllegalArgumentException(REPLACEMENTS_KEY + " must be >= 0, got " + maxThreadReplacements);
        }
        if (replacementWindowMs < 1) {
            throw new IllegalArgumentException(REPLACEMENT_WINDOW_KEY + " must be >= 1, got " + replacementWindowMs);
        }
    }

    /** Every setting at its default. */
    public static SafetySettings defaults() {
        return new SafetySettings(BIND_ADDRESS, Optional.empty(), MAX_REPLACEMENTS, REPLACEMENT_WINDOW_MS, false);
    }

    /** Whether {@code kafka} asks for at-least-once processing. */
    static boolean atLeastOnce(Map<String, String> kafka) {
        return AT_LEAST_ONCE.equalsIgnoreCase(kafka.getOrDefault(StreamsConfig.PROCESSING_GUARANTEE_CONFIG, "").trim());
    }

    /**
     * The settings in {@code values}, defaults for the rest, checked against the Kafka settings {@code kafka}
     * ({@code processing.guarantee}). Each problem goes to {@code problems}; the result is then {@code null}.
     */
    static SafetySettings from(Map<String, String> values, Map<String, String> kafka, Consumer<String> problems) {
        int[] count = {0};
        Consumer<String> counting = message -> {
            count[0]++;
            problems.accept(message);
        };
        String address = values.getOrDefault(BIND_ADDRESS_KEY, BIND_ADDRESS);
        Optional<String> token = token(values, counting);
        long max = SettingValues.whole(values, REPLACEMENTS_KEY, MAX_REPLACEMENTS, 0, 1_000, counting);
        long window = SettingValues.whole(values, REPLACEMENT_WINDOW_KEY, REPLACEMENT_WINDOW_MS, 1, Long.MAX_VALUE, counting);
        boolean accepted = flag(values, AT_LEAST_ONCE_KEY, counting);
        if (atLeastOnce(kafka) && !accepted) {
            counting.accept(StreamsConfig.PROCESSING_GUARANTEE_CONFIG + "=" + AT_LEAST_ONCE + " gives up the job's "
                    + "guarantees (after a crash events may be counted twice and decision chains may repeat a "
                    + "sequence); keep exactly_once_v2, or set " + AT_LEAST_ONCE_KEY + "=true to run anyway");
        }
        if (address.isBlank()) {
            counting.accept(BIND_ADDRESS_KEY + " must name an address, e.g. 127.0.0.1 or 0.0.0.0");
        }
        return count[0] == 0 ? new SafetySettings(address, token, (int) max, window, accepted) : null;
    }

    private static Optional<String> token(Map<String, String> values, Consumer<String> problems) {
        String direct = values.get(TOKEN_KEY);
        String file = values.get(TOKEN_FILE_KEY);
        if (direct != null && file != null) {
            problems.accept(TOKEN_KEY + " and " + TOKEN_FILE_KEY + " are both set; set one");
            return Optional.empty();
        }
        if (direct != null) {
            if (direct.isBlank()) {
                problems.accept(TOKEN_KEY + " is set but blank");
            }
            return Optional.of(direct);
        }
        if (file == null) {
            return Optional.empty();
        }
        try {
            String read = Files.readString(Path.of(file), StandardCharsets.UTF_8).trim();
            if (read.isEmpty()) {
                problems.accept(TOKEN_FILE_KEY + ": '" + file + "' is empty");
                return Optional.empty();
            }
            return Optional.of(read);
        } catch (IOException | RuntimeException e) {
            problems.accept(TOKEN_FILE_KEY + ": cannot read '" + file + "': " + e.getClass().getSimpleName());
            return Optional.empty();
        }
    }

    private static boolean flag(Map<String, String> values, String key, Consumer<String> problems) {
        String text = values.get(key);
        if (text == null) {
            return false;
        }
        if (!text.equalsIgnoreCase("true") && !text.equalsIgnoreCase("false")) {
            problems.accept(key + " must be true or false, got '" + text + "'");
            return false;
        }
        return Boolean.parseBoolean(text);
    }


    /** The settings with the token hidden. */
    @Override
    public String toString() {
        return "SafetySettings[httpBindAddress=" + httpBindAddress + ", httpToken="
                + (httpToken.isPresent() ? "(set)" : "(none)") + ", maxThreadReplacements=" + maxThreadReplacements
                + ", replacementWindowMs=" + replacementWindowMs + ", atLeastOnceAccepted=" + atLeastOnceAccepted + "]";
    }
}
