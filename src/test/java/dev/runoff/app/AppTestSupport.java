package dev.runoff.app;

import dev.runoff.broker.EmbeddedKafkaBroker;
import java.io.IOException;
import java.io.UncheckedIOException;
import java.net.ServerSocket;
import java.net.URI;
import java.net.http.HttpClient;
import java.net.http.HttpRequest;
import java.net.http.HttpResponse;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Duration;
import java.util.Comparator;
import java.util.function.BooleanSupplier;
import java.util.stream.Stream;

/** Directories, brokers, ports and HTTP for the application's tests. */
final class AppTestSupport {

    static final HttpClient HTTP = HttpClient.newBuilder().followRedirects(HttpClient.Redirect.NEVER)
            .connectTimeout(Duration.ofSeconds(5)).build();

    private AppTestSupport() {
    }

    /** An empty directory {@code target/app-tests/<name>}, emptied of what a previous run left. */
    static Path freshDirectory(String name) {
        Path dir = Path.of("target", "app-tests", name).toAbsolutePath();
        if (Files.exists(dir)) {
            try (Stream<Path> paths = Files.walk(dir)) {
                for (Path p : paths.sorted(Comparator.reverseOrder()).toList()) {
                    Files.delete(p);
                }
            } catch (IOException e) {
                throw new UncheckedIOException(e);
            }
        }
        return dir;
    }

    /** A started broker under {@code target/app-tests/<name>/kafka}. */
    static EmbeddedKafkaBroker broker(Path dir) {
        return EmbeddedKafkaBroker.builder(dir.resolve("kafka")).build().start();
    }

    /** A port that was free a moment ago. */
    static int freePort() {
        try (ServerSocket s = new ServerSocket(0)) {
            return s.getLocalPort();
        } catch (IOException e) {
            throw new UncheckedIOException(e);
        }
    }

    /** GET {@code http://127.0.0.1:port path} without following redirects. */
    static HttpResponse<String> get(int port, String path) {
        HttpRequest request = HttpRequest.newBuilder(URI.create("http://127.0.0.1:" + port + path))
                .timeout(Duration.ofSeconds(10)).build();
        try {
            return HTTP.send(request, HttpResponse.BodyHandlers.ofString());
        } catch (IOException e) {
            throw new UncheckedIOException(e);
        } catch (InterruptedException e) {
            Thread.currentThread().interrupt();
            throw new IllegalStateException(e);
        }
    }

    /** Polls {@code condition} every 100 ms until it holds; fails with {@code what} after {@code timeout}. */
    static void await(String what, Duration timeout, BooleanSupplier condition) throws InterruptedException {
        long deadline = System.nanoTime() + timeout.toNanos();
        while (!condition.getAsBoolean()) {
            if (System.nanoTime() > deadline) {
                throw new AssertionError("timed out after " + timeout.toSeconds() + " s waiting for " + what);
            }
            Thread.sleep(100);
        }
    }
}
