package dev.runoff.job;

import com.fasterxml.jackson.databind.ObjectMapper;
import com.fasterxml.jackson.databind.node.ObjectNode;
import com.sun.net.httpserver.HttpExchange;
import com.sun.net.httpserver.HttpServer;
import java.io.IOException;
import java.io.OutputStream;
import java.io.UncheckedIOException;
import java.net.InetSocketAddress;
import java.net.URLDecoder;
import java.nio.charset.StandardCharsets;
import java.util.concurrent.ExecutorService;
import java.util.concurrent.Executors;
import org.apache.kafka.streams.KafkaStreams;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;

/**
 * The job's HTTP endpoint (JDK HTTP server, GET and HEAD only):
 * <ul>
 *   <li>{@code /health}: 200 while the Kafka Streams client is alive (any state but ERROR, PENDING_ERROR,
 *       NOT_RUNNING), else 503; for a liveness probe.</li>
 *   <li>{@code /ready}: 200 only while the client is RUNNING (not while it starts, rebalances or restores
 *       state), else 503; for a readiness probe.</li>
 *   <li>{@code /metrics}: Prometheus text format.</li>
 *   <li>{@code /experiments/{id}}: the experiment's current state as JSON (200), 404 when no instance holds
 *       it, 307 to the instance that holds it (body naming it), 503 while that cannot be told.</li>
 * </ul>
 */
public final class StatusServer implements AutoCloseable {

    /** What the server reports on. */
    public interface Backend {
        /** State of the Kafka Streams client. */
        KafkaStreams.State state();

        /** The metrics in Prometheus text format. */
        String metrics();

        /** The state of experiment {@code id}. */
        Lookup experiment(String id);
    }

    /** Content type of the Prometheus text format, version 0.0.4. */
    public static final String PROMETHEUS_TEXT = "text/plain; version=0.0.4; charset=utf-8";

    private static final Logger LOG = LoggerFactory.getLogger(StatusServer.class);
    private static final String EXPERIMENTS = "/experiments/";
    private static final ObjectMapper JSON = new ObjectMapper();

    private final HttpServer server;
    private final ExecutorService executor;
    private final Backend backend;

    private StatusServer(HttpServer server, ExecutorService executor, Backend backend) {
        this.server = server;
        this.executor = executor;
        this.backend = backend;
    }

    /**
     * Starts serving on {@code port} of every interface (0: a free port, see {@link #port()}).
     *
     * @throws UncheckedIOException when the port cannot be bound
     */
    public static StatusServer start(int port, Backend backend) {
        HttpServer server;
        try {
            server = HttpServer.create(new InetSocketAddress(port), 0);
        } catch (IOException e) {
            throw new UncheckedIOException("cannot listen on HTTP port " + port + ": " + e.getMessage(), e);
        }
        ExecutorService executor = Executors.newFixedThreadPool(2, r -> {
            Thread t = new Thread(r, "runoff-http");
            t.setDaemon(true);
            return t;
        });
        StatusServer status = new StatusServer(server, executor, backend);
        server.createContext("/", status::handle);
        server.setExecutor(executor);
        server.start();
        LOG.info("HTTP endpoint listening on port {}", status.port());
        return status;
    }

    /** The port the server listens on. */
    public int port() {
        return server.getAddress().getPort();
    }

    /** Stops serving (waits at most a second for requests in flight). */
    @Override
    public void close() {
        server.stop(1);
        executor.shutdownNow();
    }

    private void handle(HttpExchange exchange) throws IOException {
        try (exchange) {
            String method = exchange.getRequestMethod();
            if (!"GET".equals(method) && !"HEAD".equals(method)) {
                exchange.getResponseHeaders().add("Allow", "GET, HEAD");
                send(exchange, 405, "text/plain; charset=utf-8", "method not allowed\n");
                return;
            }
            route(exchange, exchange.getRequestURI().getRawPath());
        } catch (RuntimeException e) {
            LOG.warn("HTTP request {} failed: {}", exchange.getRequestURI(), e.toString());
            send(exchange, 500, "text/plain; charset=utf-8", "internal error\n");
        }
    }

    private void route(HttpExchange exchange, String path) throws IOException {
        switch (path) {
            case "/health" -> state(exchange, alive(backend.state()));
            case "/ready" -> state(exchange, backend.state() == KafkaStreams.State.RUNNING);
            case "/metrics" -> send(exchange, 200, PROMETHEUS_TEXT, backend.metrics());
            default -> {
                if (path.startsWith(EXPERIMENTS) && path.length() > EXPERIMENTS.length()) {
                    String id = URLDecoder.decode(path.substring(EXPERIMENTS.length()), StandardCharsets.UTF_8);
                    experiment(exchange, id);
                } else {
                    send(exchange, 404, "text/plain; charset=utf-8",
                            "not found: try /health, /ready, /metrics or /experiments/{id}\n");
                }
            }
        }
    }

    private static boolean alive(KafkaStreams.State state) {
        return state != KafkaStreams.State.ERROR && state != KafkaStreams.State.PENDING_ERROR
                && state != KafkaStreams.State.NOT_RUNNING;
    }

    private void state(HttpExchange exchange, boolean ok) throws IOException {
        ObjectNode body = JSON.createObjectNode().put("status", ok ? "UP" : "DOWN")
                .put("state", backend.state().name());
        sendJson(exchange, ok ? 200 : 503, body);
    }

    private void experiment(HttpExchange exchange, String id) throws IOException {
        Lookup lookup = backend.experiment(id);
        ObjectNode body = JSON.createObjectNode().put("experimentId", id);
        if (lookup instanceof Lookup.Found found) {
            send(exchange, 200, "application/json", found.json());
        } else if (lookup instanceof Lookup.Elsewhere elsewhere) {
            body.put("activeHost", elsewhere.activeHost());
            elsewhere.standbyHosts().forEach(body.putArray("standbyHosts")::add);
            exchange.getResponseHeaders().add("Location", "http://" + elsewhere.activeHost() + EXPERIMENTS
                    + exchange.getRequestURI().getRawPath().substring(EXPERIMENTS.length()));
            sendJson(exchange, 307, body);
        } else if (lookup instanceof Lookup.Unavailable unavailable) {
            exchange.getResponseHeaders().add("Retry-After", "1");
            sendJson(exchange, 503, body.put("error", unavailable.reason()));
        } else {
            sendJson(exchange, 404, body.put("error", "no experiment with this id"));
        }
    }

    private static void sendJson(HttpExchange exchange, int status, ObjectNode body) throws IOException {
        send(exchange, status, "application/json", JSON.writeValueAsString(body) + "\n");
    }

    private static void send(HttpExchange exchange, int status, String type, String body) throws IOException {
        byte[] bytes = body.getBytes(StandardCharsets.UTF_8);
        exchange.getResponseHeaders().set("Content-Type", type);
        boolean head = "HEAD".equals(exchange.getRequestMethod());
        exchange.sendResponseHeaders(status, head ? -1 : bytes.length);
        if (!head) {
            try (OutputStream out = exchange.getResponseBody()) {
                out.write(bytes);
            }
        }
    }
}
