package dev.runoff.broker;

import java.util.List;
import java.util.concurrent.CopyOnWriteArrayList;
import org.apache.kafka.common.utils.internals.Exit;

/**
 * Replaces Kafka's process exit and halt hooks (used by the broker's fatal-fault handler) with ones
 * that only record the call, so a test can assert the broker never tried to end the JVM.
 * {@code Exit} is a Kafka-internal class; this is test-only code.
 */
final class ExitGuard implements AutoCloseable {
    private final List<String> calls = new CopyOnWriteArrayList<>();

    private ExitGuard() {
    }

    /** Installs the recording hooks until {@link #close()}. */
    static ExitGuard install() {
        ExitGuard guard = new ExitGuard();
        Exit.setHaltProcedure((status, message) -> guard.calls.add("halt(" + status + ", " + message + ")"));
        Exit.setExitProcedure((status, message) -> guard.calls.add("exit(" + status + ", " + message + ")"));
        return guard;
    }

    /** Exit or halt calls seen so far, e.g. {@code "halt(1, null)"}. */
    List<String> calls() {
        return List.copyOf(calls);
    }

    /** Restores Kafka's default hooks, which end the process. */
    @Override
    public void close() {
        Exit.resetHaltProcedure();
        Exit.resetExitProcedure();
    }
}
