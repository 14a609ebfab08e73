package dev.runoff.testkit;

import java.time.Duration;
import java.util.function.BooleanSupplier;

/** Polling until a condition holds, with a deadline, for tests that wait on a broker or a job. */
public final class Await {

    private static final long STEP_MS = 50;

    private Await() {
    }

    /**
     * Polls {@code condition} every 50 ms until it holds.
     *
     * @param what    what is awaited, for the failure message
     * @param timeout how long to wait at most
     * @throws AssertionError when {@code timeout} passes first, or the thread is interrupted
     */
    public static void until(String what, Duration timeout, BooleanSupplier condition) {
        long deadline = System.nanoTime() + timeout.toNanos();
        while (!condition.getAsBoolean()) {
            if (System.nanoTime() > deadline) {
                throw new AssertionError("timed out after " + timeout.toMillis() + " ms waiting for " + what);
            }
            try {
                Thread.sleep(STEP_MS);
            } catch (InterruptedException e) {
                Thread.currentThread().interrupt();
                throw new AssertionError("interrupted while waiting for " + what, e);
            }
        }
    }
}
