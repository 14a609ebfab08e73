package dev.runoff.broker;

import java.nio.file.Files;
import java.nio.file.Path;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Locale;
import java.util.Map;
import java.util.Objects;
import java.util.Set;
import java.util.regex.Pattern;

/**
 * How the client listener of an {@link EmbeddedKafkaBroker} is secured: TLS ({@code SSL}), or SASL/SCRAM over
 * TLS ({@code SASL_SSL}). The controller listener stays plaintext on loopback; it carries only the node's own
 * KRaft traffic.
 *
 * <p>The broker presents the certificate of a PKCS12 key store and trusts a PEM certificate (it is a TLS client
 * of its own listener for inter-broker requests such as transaction markers). With SCRAM the broker
 * authenticates to itself as a user whose credential is written into the metadata log when the directory is
 * formatted (so it exists before the first inter-broker connection); more users are added at run time with
 * {@link EmbeddedKafkaBroker#addScramUser}.
 */
public final class BrokerSecurity {
    /** The SCRAM mechanisms Kafka offers (Kafka documentation, "Authentication using SASL/SCRAM"). */
    public static final Set<String> SCRAM_MECHANISMS = Set.of("SCRAM-SHA-256", "SCRAM-SHA-512");
    /** User names and passwords: no quote, comma, bracket or space, which would break the JAAS line. */
    private static final Pattern PLAIN_TOKEN = Pattern.compile("[A-Za-z0-9._~-]+");

    private final Path keyStore;
    private final String keyStorePassword;
    private final Path trustedCertificate;
    private final String mechanism;
    private final String user;
    private final String password;

    private BrokerSecurity(Path keyStore, String keyStorePassword, Path trustedCertificate, String mechanism,
                           String user, String password) {
        this.keyStore = keyStore;
        this.keyStorePassword = keyStorePassword;
        this.trustedCertificate = trustedCertificate;
        this.mechanism = mechanism;
        this.user = user;
        this.password = password;
    }

    /**
     * A TLS listener.
     *
     * @param keyStore           PKCS12 key store with the broker's key and certificate (a readable file)
     * @param keyStorePassword   its password
     * @param trustedCertificate PEM certificate (or chain) the broker trusts as a client of its own listener
     * @throws IllegalArgumentException naming a file that is not readable or a blank password
     */
    public static BrokerSecurity tls(Path keyStore, String keyStorePassword, Path trustedCertificate) {
        checkReadable("keyStore", keyStore);
        checkReadable("trustedCertificate", trustedCertificate);
        if (keyStorePassword == null || keyStorePassword.isBlank()) {
            throw new IllegalArgumentException("keyStorePassword must not be blank");
        }
        return new BrokerSecurity(keyStore.toAbsolutePath(), keyStorePassword, trustedCertificate.toAbsolutePath(),
                null, null, null);
    }

    /**
     * This TLS listener with SASL/SCRAM authentication on top ({@code SASL_SSL}).
     *
     * @param scramMechanism {@code SCRAM-SHA-256} or {@code SCRAM-SHA-512}
     * @param brokerUser     the user the broker authenticates as to itself, created at format time
     * @param brokerPassword its password
     * @throws IllegalArgumentException naming an unknown mechanism, or a user or password outside
     *                                  {@code [A-Za-z0-9._~-]+}
     */
    public BrokerSecurity withScram(String scramMechanism, String brokerUser, String brokerPassword) {
        if (!SCRAM_MECHANISMS.contains(scramMechanism)) {
            throw new IllegalArgumentException("scramMechanism must be one of " + List.copyOf(SCRAM_MECHANISMS)
                    + ", got '" + scramMechanism + "'");
        }
        checkToken("brokerUser", brokerUser, true);
        checkToken("brokerPassword", brokerPassword, false);
        return new BrokerSecurity(keyStore, keyStorePassword, trustedCertificate, scramMechanism, brokerUser,
                brokerPassword);
    }

    /** {@code SASL_SSL} with SCRAM, else {@code SSL}: the listener's name and its security protocol. */
    public String protocol() {
        return mechanism == null ? "SSL" : "SASL_SSL";
    }

    /** The SCRAM mechanism, or {@code null} for TLS alone. */
    public String scramMechanism() {
        return mechanism;
    }

    /**
     * The client properties with which a Kafka client reaches this listener: the protocol, the trusted PEM
     * certificate and, with SCRAM, the mechanism and a JAAS line for {@code user}.
     *
     * @param user     a SCRAM user ({@code null} for TLS alone)
     * @param password the user's password
     */
    public Map<String, String> clientProperties(String user, String password) {
        Map<String, String> props = new LinkedHashMap<>();
        props.put("security.protocol", protocol());
        props.put("ssl.truststore.type", "PEM");
        props.put("ssl.truststore.location", trustedCertificate.toString());
        if (mechanism != null) {
            checkToken("user", user, true);
            checkToken("password", password, false);
            props.put("sasl.mechanism", mechanism);
            props.put("sasl.jaas.config", jaas(user, password));
        }
        return props;
    }

    /** The client properties of the broker's own user (TLS alone: no user). */
    Map<String, String> brokerClientProperties() {
        return clientProperties(user, password);
    }

    /** The server properties of the secured listener named {@link #protocol()}. */
    Map<String, String> serverProperties() {
        Map<String, String> props = new LinkedHashMap<>();
        props.put("ssl.keystore.type", "PKCS12");
        props.put("ssl.keystore.location", keyStore.toString());
        props.put("ssl.keystore.password", keyStorePassword);
        props.put("ssl.truststore.type", "PEM");
        props.put("ssl.truststore.location", trustedCertificate.toString());
        if (mechanism != null) {
            String listener = protocol().toLowerCase(Locale.ROOT);
            props.put("sasl.enabled.mechanisms", mechanism);
            props.put("sasl.mechanism.inter.broker.protocol", mechanism);
            props.put("listener.name." + listener + "." + mechanism.toLowerCase(Locale.ROOT) + ".sasl.jaas.config",
                    jaas(user, password));
        }
        return props;
    }

    /**
     * The {@code --add-scram} arguments of Kafka's storage formatter that create the broker's own user, or
     * none for TLS alone.
     */
    List<String> scramArguments() {
        return mechanism == null ? List.of() : List.of(mechanism + "=[name=" + user + ",password=" + password + "]");
    }

    static String jaas(String user, String password) {
        return "org.apache.kafka.common.security.scram.ScramLoginModule required username=\"" + user
                + "\" password=\"" + password + "\";";
    }

    static void checkToken(String name, String value, boolean showValue) {
        if (value == null || !PLAIN_TOKEN.matcher(value).matches()) {
            throw new IllegalArgumentException(name + " must match [A-Za-z0-9._~-]+"
                    + (showValue ? ", got '" + value + "'" : ""));
        }
    }

    private static void checkReadable(String name, Path file) {
        Objects.requireNonNull(file, name);
        if (!Files.isRegularFile(file) || !Files.isReadable(file)) {
            throw new IllegalArgumentException(name + " must be a readable file, got " + file);
        }
    }

    @Override
    public String toString() {
        return protocol() + (mechanism == null ? "" : " " + mechanism + " (broker user " + user + ")");
    }
}
