package dev.runoff.testkit;

import java.io.IOException;
import java.io.UncheckedIOException;
import java.net.ServerSocket;

/** Local ports for tests that start servers. */
public final class Ports {

    private Ports() {
    }

    /** A port that was free a moment ago (another process may take it before the caller binds it). */
    public static int free() {
        try (ServerSocket s = new ServerSocket(0)) {
            return s.getLocalPort();
        } catch (IOException e) {
            throw new UncheckedIOException(e);
        }
    }
}
