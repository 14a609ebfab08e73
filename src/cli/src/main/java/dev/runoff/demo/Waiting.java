package dev.runoff.demo;

import java.time.Duration;
import java.util.function.BooleanSupplier;

/** Polls a condition until it holds or a timeout passes. */
final class Waiting {

    private static final long POLL_MS = 50;

    private Waiting() {
    }

    /**
     * Returns once {@code condition} holds, polling every 50 ms.
     *
     * @throws IllegalStateException naming {@code what} when {@code timeout} passes first
     */
    static void until(String what, Duration timeout, BooleanSupplier condition) throws InterruptedException {
        long deadline = System.nanoTime() + timeout.toNanos();
        while (!condition.getAsBoolean()) {
            if (System.nanoTime() > deadline) {
                throw new IllegalStateException(what + " did not happen within " + timeout.toSeconds() + " s");
            }
            Thread.sleep(POLL_MS);
        }
    }
}
