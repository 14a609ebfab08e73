package dev.runoff.broker;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNotEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;

import java.nio.file.Path;
import java.time.Duration;
import org.junit.jupiter.api.Test;

class BrokerPortsTest {
    @Test
    void pickFreeReturnsTwoDistinctPortsThatCanBeBound() throws BindFailure {
        BrokerPorts ports = BrokerPorts.pickFree();
        assertNotEquals(ports.broker(), ports.controller());
        ports.probe();
    }

    @Test
    void bootstrapServersUsesLoopbackAddress() {
        assertEquals("127.0.0.1:19092", new BrokerPorts(19092, 19093).bootstrapServers());
    }

    @Test
    void portOutsideTcpRangeIsRejectedByName() {
        // TCP ports are 16-bit and port 0 means "any" (RFC 793), so only 1..65535 can be fixed.
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class,
                () -> EmbeddedKafkaBroker.builder(Path.of("unused")).ports(0, 9093));
        assertEquals("brokerPort must be in [1, 65535], got 0", e.getMessage());
        e = assertThrows(IllegalArgumentException.class,
                () -> EmbeddedKafkaBroker.builder(Path.of("unused")).ports(9092, 65_536));
        assertEquals("controllerPort must be in [1, 65535], got 65536", e.getMessage());
    }

    @Test
    void equalPortsAreRejected() {
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class,
                () -> EmbeddedKafkaBroker.builder(Path.of("unused")).ports(9092, 9092));
        assertEquals("brokerPort and controllerPort must differ, both are 9092", e.getMessage());
    }

    @Test
    void nonPositiveStartTimeoutIsRejected() {
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class,
                () -> EmbeddedKafkaBroker.builder(Path.of("unused")).startTimeout(Duration.ZERO));
        assertEquals("startTimeout must be positive, got PT0S", e.getMessage());
    }
}
