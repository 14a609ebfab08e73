package dev.runoff.broker;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertInstanceOf;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.runoff.testkit.Directories;
import dev.runoff.testkit.TestCertificates;
import java.nio.file.Path;
import java.time.Duration;
import java.util.HashMap;
import java.util.List;
import java.util.Map;
import java.util.concurrent.ExecutionException;
import java.util.concurrent.TimeUnit;
import org.apache.kafka.common.TopicPartition;
import org.apache.kafka.common.serialization.StringDeserializer;
import org.apache.kafka.clients.admin.Admin;
import org.apache.kafka.clients.admin.AdminClientConfig;
import org.apache.kafka.clients.consumer.KafkaConsumer;
import org.apache.kafka.clients.producer.KafkaProducer;
import org.apache.kafka.clients.producer.ProducerRecord;
import org.apache.kafka.common.errors.SslAuthenticationException;
import org.apache.kafka.common.errors.TimeoutException;
import org.junit.jupiter.api.AfterAll;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;

/** One embedded broker whose client listener is TLS only: TLS clients work, others are refused. */
class TlsListenerIT {
    private static final Duration WAIT = Duration.ofSeconds(20);
    /** How long the refused clients may try: a refusal must come within a bounded wait. */
    private static final int REFUSAL_TIMEOUT_MS = 5_000;
    private static final String STRING_SER = "org.apache.kafka.common.serialization.StringSerializer";

    private static EmbeddedKafkaBroker broker;

    @BeforeAll
    static void startBroker() {
        Path dir = Directories.fresh("tls-listener");
        TestCertificates certs = TestCertificates.generate(dir.resolve("certs"), "broker-store-pw");
        broker = EmbeddedKafkaBroker.builder(dir.resolve("kafka"))
                .security(BrokerSecurity.tls(certs.keyStore(), certs.password(), certs.certificate()))
                .build().start();
    }

    @AfterAll
    static void stopBroker() {
        broker.close();
    }

    @Test
    void tlsClientsCommitTransactionsAndReadThemBack() {
        broker.createTopic("tls-tx", 1, Map.of());
        // a committed transaction needs the broker's own inter-broker requests (transaction markers) over TLS
        try (KafkaProducer<String, String> producer = new KafkaProducer<>(secured(Map.of(
                "transactional.id", "tls-1", "key.serializer", STRING_SER, "value.serializer", STRING_SER)))) {
            producer.initTransactions();
            producer.beginTransaction();
            producer.send(new ProducerRecord<>("tls-tx", "k", "over TLS"));
            producer.commitTransaction();
        }
        Map<String, Object> props = new HashMap<>(BrokerTestSupport.consumerProps(broker, null, "read_committed"));
        props.putAll(broker.security().clientProperties(null, null));
        try (KafkaConsumer<String, String> consumer = new KafkaConsumer<>(props,
                new StringDeserializer(),
                new StringDeserializer())) {
            consumer.assign(List.of(new TopicPartition("tls-tx", 0)));
            assertEquals(List.of("over TLS"),
                    BrokerTestSupport.values(BrokerTestSupport.pollAtLeast(consumer, 1, WAIT)));
        }
    }

    @Test
    void aPlaintextClientIsRefusedWithinItsTimeout() {
        long began = System.nanoTime();
        Throwable cause = describeCluster(Map.of());
        // Kafka clients (from memory): a plaintext client cannot complete a request on a TLS port and times out
        assertInstanceOf(TimeoutException.class, cause, String.valueOf(cause));
        assertTrue(System.nanoTime() - began < TimeUnit.SECONDS.toNanos(15), "refusal took too long");
    }

    @Test
    void aClientThatDoesNotTrustTheCertificateFailsTheHandshake() {
        Map<String, String> untrusting = Map.of("security.protocol", "SSL");
        Throwable cause = describeCluster(untrusting);
        // Kafka clients report a failed TLS handshake as SslAuthenticationException (from memory); the client
        // trusts only the JDK's default certificates here
        assertInstanceOf(SslAuthenticationException.class, cause, String.valueOf(cause));
    }

    private static Map<String, Object> secured(Map<String, Object> extra) {
        Map<String, Object> props = new HashMap<>(broker.security().clientProperties(null, null));
        props.put("bootstrap.servers", broker.bootstrapServers());
        props.putAll(extra);
        return props;
    }

    /** The cause of the failure of {@code describeCluster} with {@code client} properties. */
    private static Throwable describeCluster(Map<String, String> client) {
        Map<String, Object> props = new HashMap<>(client);
        props.put(AdminClientConfig.BOOTSTRAP_SERVERS_CONFIG, broker.bootstrapServers());
        props.put(AdminClientConfig.DEFAULT_API_TIMEOUT_MS_CONFIG, REFUSAL_TIMEOUT_MS);
        props.put(AdminClientConfig.REQUEST_TIMEOUT_MS_CONFIG, REFUSAL_TIMEOUT_MS);
        try (Admin admin = Admin.create(props)) {
            ExecutionException e = assertThrows(ExecutionException.class,
                    () -> admin.describeCluster().clusterId().get(30, TimeUnit.SECONDS));
            return e.getCause();
        }
    }
}
