package dev.runoff.broker;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.net.BindException;
import java.net.SocketException;
import org.apache.kafka.common.KafkaException;
import org.junit.jupiter.api.Test;

class BindFailureTest {
    @Test
    void findsBindExceptionWrappedTheWayKafkaWrapsIt() {
        // Shape seen in the broker log of a busy PLAINTEXT port (Kafka 4.4.0):
        // RuntimeException("Unable to start acceptor for PLAINTEXT") <- KafkaException("Socket server
        // failed to bind to 127.0.0.1:P: Address already in use.") <- java.net.BindException
        Throwable failure = new RuntimeException("Unable to start acceptor for PLAINTEXT",
                new KafkaException("Socket server failed to bind", new BindException("Address already in use")));
        assertTrue(BindFailure.isCauseOf(failure));
    }

    @Test
    void otherSocketErrorsAreNotBindFailures() {
        assertFalse(BindFailure.isCauseOf(new KafkaException("boom", new SocketException("Connection reset"))));
        assertFalse(BindFailure.isCauseOf(new IllegalStateException("no cause")));
    }

    @Test
    void messageQuotesKafkaWrapperThatNamesThePort() {
        Throwable failure = new RuntimeException("Unable to start acceptor for PLAINTEXT",
                new KafkaException("Socket server failed to bind to 127.0.0.1:9092: Address already in use.",
                        new BindException("Address already in use")));
        assertEquals("could not bind PLAINTEXT 127.0.0.1:9092, CONTROLLER 127.0.0.1:9093: Socket server failed"
                        + " to bind to 127.0.0.1:9092: Address already in use.",
                new BindFailure("PLAINTEXT 127.0.0.1:9092, CONTROLLER 127.0.0.1:9093", failure).getMessage());
    }

    @Test
    void messageNamesTheAddressAndTheCause() {
        BindFailure failure = new BindFailure("CONTROLLER 127.0.0.1:9093", new BindException("Address already in use"));
        assertEquals("could not bind CONTROLLER 127.0.0.1:9093: Address already in use", failure.getMessage());
    }
}
