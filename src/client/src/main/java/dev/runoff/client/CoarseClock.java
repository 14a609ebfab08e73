package dev.runoff.client;

import java.time.Clock;
import java.time.Duration;
import java.util.Objects;
import java.util.concurrent.locks.LockSupport;

/**
 * A clock that reads its source once per tick on a daemon thread and answers {@link #millis()} from a
 * volatile field, so that {@link AllocationTable#pick} does not pay for a system clock read on every call
 * (on the build machines, a virtual machine, {@code System.currentTimeMillis()} measured about 50 ns under
 * load, half the pick budget). It lags its source by at most about one tick plus scheduling delay and
 * never runs ahead of it; use it where staleness is judged against validity windows of seconds to minutes.
 *
 * <p>{@link #close()} stops the thread; the clock then keeps answering its last reading. Its zone is UTC.
 */
public final class CoarseClock extends MillisClock implements AutoCloseable {
    private final Clock source;
    private final long tickNanos;
    private final Thread ticker;
    private volatile long millis;
    private volatile boolean running = true;

    private CoarseClock(Clock source, Duration tick) {
        this.source = source;
        this.tickNanos = tick.toNanos();
        this.millis = source.millis();
        this.ticker = new Thread(this::tick, "runoff-coarse-clock");
        this.ticker.setDaemon(true);
    }

    /**
     * Starts a coarse clock.
     *
     * @param source the clock to follow (for example {@code Clock.systemUTC()})
     * @param tick   how often the source is read, a positive duration (10 ms is plenty for validity checks)
     */
    public static CoarseClock start(Clock source, Duration tick) {
        CoarseClock clock = new CoarseClock(Objects.requireNonNull(source, "source"), Args.positive("tick", tick));
        clock.ticker.start();
        return clock;
    }

    private void tick() {
        while (running) {
            LockSupport.parkNanos(this, tickNanos);
            millis = source.millis();
        }
    }

    /** The source's time at the latest tick. */
    @Override
    public long millis() {
        return millis;
    }

    /** Stops the ticking thread and waits for it. Idempotent. */
    @Override
    public void close() {
        running = false;
        LockSupport.unpark(ticker);
        try {
            ticker.join();
        } catch (InterruptedException e) {
            Thread.currentThread().interrupt();
        }
    }

    /** True while the ticking thread runs. */
    public boolean isTicking() {
        return ticker.isAlive();
    }
}
