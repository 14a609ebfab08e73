package dev.runoff.broker;

import static org.junit.jupiter.api.Assertions.assertEquals;

import java.util.List;

/**
 * A test broker started under an {@link ExitGuard}: closing it stops the broker, then fails if Kafka
 * tried to exit or halt the JVM at any point, and restores Kafka's hooks.
 */
final class GuardedBroker implements AutoCloseable {
    private final ExitGuard exitGuard;
    private final EmbeddedKafkaBroker broker;

    private GuardedBroker(ExitGuard exitGuard, EmbeddedKafkaBroker broker) {
        this.exitGuard = exitGuard;
        this.broker = broker;
    }

    /** Installs the guard, then builds and starts the broker. */
    static GuardedBroker start(EmbeddedKafkaBroker.Builder builder) {
        ExitGuard guard = ExitGuard.install();
        try {
            return new GuardedBroker(guard, builder.build().start());
        } catch (RuntimeException e) {
            guard.close();
            throw e;
        }
    }

    /** The running broker. */
    EmbeddedKafkaBroker broker() {
        return broker;
    }

    /** Exit or halt calls Kafka made so far. */
    List<String> exitCalls() {
        return exitGuard.calls();
    }

    @Override
    public void close() {
        try {
            broker.close();
            assertEquals(List.of(), exitGuard.calls(), "Kafka tried to end the JVM");
        } finally {
            exitGuard.close();
        }
    }
}
