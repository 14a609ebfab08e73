package dev.runoff.broker;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.IOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.List;
import java.util.Map;
import org.junit.jupiter.api.BeforeEach;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/** The listener and client properties of a secured embedded broker, and the checks of its arguments. */
class BrokerSecurityTest {

    @TempDir
    Path dir;
    private Path keyStore;
    private Path certificate;

    @BeforeEach
    void files() throws IOException {
        keyStore = Files.writeString(dir.resolve("broker.p12"), "not read here");
        certificate = Files.writeString(dir.resolve("broker.pem"), "not read here");
    }

    @Test
    void scramOverTlsNamesTheListenerAfterItsProtocolAndAuthenticatesTheBrokerToItself() {
        BrokerSecurity security = BrokerSecurity.tls(keyStore, "store-pw", certificate)
                .withScram("SCRAM-SHA-512", "broker", "broker-pw");
        Map<String, String> server = BrokerProperties.of(dir, new BrokerPorts(9092, 9093), security, Map.of());
        assertEquals("SASL_SSL://127.0.0.1:9092,CONTROLLER://127.0.0.1:9093", server.get("listeners"));
        assertEquals("SASL_SSL:SASL_SSL,CONTROLLER:PLAINTEXT", server.get("listener.security.protocol.map"));
        assertEquals("SASL_SSL", server.get("inter.broker.listener.name"));
        assertEquals("SCRAM-SHA-512", server.get("sasl.mechanism.inter.broker.protocol"));
        // Kafka broker configuration, a listener's JAAS line (from memory):
        // listener.name.<listener>.<mechanism>.sasl.jaas.config
        assertEquals(BrokerSecurity.jaas("broker", "broker-pw"),
                server.get("listener.name.sasl_ssl.scram-sha-512.sasl.jaas.config"));
        // kafka-storage format --add-scram syntax (from memory; SecuredClusterIT's broker authenticates to
        // itself with the credential it creates)
        assertEquals(List.of("SCRAM-SHA-512=[name=broker,password=broker-pw]"), security.scramArguments());
        Map<String, String> client = security.clientProperties("runoff", "runoff-pw");
        assertEquals(List.of("security.protocol", "ssl.truststore.type", "ssl.truststore.location", "sasl.mechanism",
                "sasl.jaas.config"), List.copyOf(client.keySet()));
        assertTrue(client.get("sasl.jaas.config").contains("username=\"runoff\" password=\"runoff-pw\""));
        assertFalse(security.toString().contains("broker-pw"), security.toString());
    }

    @Test
    void tlsAloneNeedsNoUserAndFormatsNoCredential() {
        BrokerSecurity security = BrokerSecurity.tls(keyStore, "store-pw", certificate);
        assertEquals("SSL", security.protocol());
        assertEquals(List.of(), security.scramArguments());
        assertEquals(Map.of("security.protocol", "SSL", "ssl.truststore.type", "PEM", "ssl.truststore.location",
                certificate.toAbsolutePath().toString()), security.clientProperties(null, null));
        Map<String, String> server = BrokerProperties.of(dir, new BrokerPorts(9092, 9093), security, Map.of());
        assertEquals("SSL:SSL,CONTROLLER:PLAINTEXT", server.get("listener.security.protocol.map"));
        assertFalse(server.containsKey("sasl.enabled.mechanisms"));
    }

    @Test
    void badArgumentsAreNamed() {
        IllegalArgumentException missing = assertThrows(IllegalArgumentException.class,
                () -> BrokerSecurity.tls(dir.resolve("absent.p12"), "store-pw", certificate));
        assertTrue(missing.getMessage().startsWith("keyStore must be a readable file"), missing.getMessage());
        BrokerSecurity tls = BrokerSecurity.tls(keyStore, "store-pw", certificate);
        IllegalArgumentException mechanism = assertThrows(IllegalArgumentException.class,
                () -> tls.withScram("PLAIN", "broker", "pw"));
        assertTrue(mechanism.getMessage().contains("got 'PLAIN'"), mechanism.getMessage());
        IllegalArgumentException quote = assertThrows(IllegalArgumentException.class,
                () -> tls.withScram("SCRAM-SHA-256", "broker", "pw\"; other"));
        assertEquals("brokerPassword must match [A-Za-z0-9._~-]+", quote.getMessage(), "the password is not shown");
    }
}
