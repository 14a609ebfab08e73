package dev.runoff.demo;

import java.util.ArrayDeque;
import java.util.Deque;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;

/**
 * Closes what was registered, last registered first, once: on {@link #close()} or, when a shutdown hook
 * was installed, when the JVM is asked to stop (Ctrl-C, SIGTERM); a second closer waits for the first to
 * finish. A failure to close one resource is logged and does not keep the others open.
 */
public final class Closer implements AutoCloseable {

    private static final Logger LOG = LoggerFactory.getLogger(Closer.class);

    private final Deque<AutoCloseable> resources = new ArrayDeque<>();
    /** Held while closing, so that a hook and the main thread never close in parallel or out of order. */
    private final Object closing = new Object();
    private Thread hook;
    private boolean closed;

    /** An empty closer. */
    public Closer() {
        // nothing registered yet
    }

    /** Registers {@code resource} and returns it. */
    public synchronized <T extends AutoCloseable> T register(T resource) {
        if (closed) {
            closeQuietly(resource);
            throw new IllegalStateException("shutting down: no new resources");
        }
        resources.push(resource);
        return resource;
    }

    /** Closes everything when the JVM shuts down, unless {@link #close()} ran first. */
    public synchronized void closeOnShutdown(String name) {
        if (hook == null) {
            hook = new Thread(this::closeFromHook, name);
            Runtime.getRuntime().addShutdownHook(hook);
        }
    }

    /** Whether closing has begun. */
    public synchronized boolean isClosed() {
        return closed;
    }

    @Override
    public void close() {
        Thread installed;
        synchronized (this) {
            installed = hook;
            hook = null;
        }
        if (installed != null) {
            try {
                Runtime.getRuntime().removeShutdownHook(installed);
            } catch (IllegalStateException e) {
                // the JVM is already shutting down: the hook closes everything
            }
        }
        closeAll();
    }

    private void closeFromHook() {
        closeAll();
    }

    private void closeAll() {
        synchronized (closing) {
            while (true) {
                AutoCloseable next;
                synchronized (this) {
                    closed = true;
                    next = resources.poll();
                }
                if (next == null) {
                    return;
                }
                closeQuietly(next);
            }
        }
    }

    private static void closeQuietly(AutoCloseable resource) {
        try {
            resource.close();
        } catch (Exception e) {
            LOG.warn("event=close-failed resource={} cause=\"{}\"", resource.getClass().getSimpleName(), e.toString());
        }
    }
}
