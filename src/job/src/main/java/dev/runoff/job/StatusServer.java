package dev.runoff.job;

import com.fasterxml.jackson.databind.ObjectMapper;
import com.fasterxml.jackson.databind.node.ArrayNode;
import com.fasterxml.jackson.databind.node.ObjectNode;
import com.sun.net.httpserver.HttpExchange;
import com.sun.net.httpserver.HttpServer;
import dev.runoff.job.pages.Pages;
import java.io.IOException;
import java.io.OutputStream;
import java.io.UncheckedIOException;
import java.net.InetSocketAddress;
import java.net.URLDecoder;
import java.nio.charset.StandardCharsets;
import java.security.MessageDigest;
import java.util.List;
import java.util.Locale;
import java.util.Optional;
import java.util.concurrent.ArrayBlockingQueue;
import java.util.concurrent.ExecutorService;
import java.util.concurrent.Executors;
import java.util.concurrent.RejectedExecutionException;
import java.util.concurrent.ThreadFactory;
import java.util.concurrent.ThreadPoolExecutor;
import java.util.concurrent.TimeUnit;
import org.apache.kafka.streams.KafkaStreams;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;

/**
 * The job's HTTP endpoint (JDK HTTP server, GET and HEAD only):
 * <ul>
 *   <li>{@code /health}: 200 while the Kafka Streams client is alive (any state but ERROR, PENDING_ERROR,
 *       NOT_RUNNING) and the job has not given up, else 503 with the cause; for a liveness probe.</li>
 *   <li>{@code /ready}: 200 only while the client is RUNNING (not while it starts, rebalances or restores
 *       state), else 503; for a readiness probe.</li>
 *   <li>{@code /metrics}: Prometheus text format.</li>
 *   <li>{@code /lagging}: the running experiments this instance holds that the latest census found lagging
 *       (the {@code runoff_experiments_lagging} gauge) as JSON: their count, the ids of the first
 *       {@value LaggingExperiments#MAX_LISTED} and whether more lagged, and the scan's time.</li>
 *   <li>{@code /experiments/{id}}: the experiment's current state as JSON (200), 404 when no instance holds
 *       it, 307 to the instance that holds it (body naming it), 503 while that cannot be told; a request whose
 *       {@code Accept} header names {@code text/html} and not {@code application/json} (a browser) gets the
 *       experiment's page instead (see {@link Pages}).</li>
 *   <li>{@code /}: the page listing every experiment (HTML).</li>
 * </ul>
 *
 * <p>It listens on one address (loopback unless configured otherwise). With a bearer token, every path but
 * the two probes requires {@code Authorization: Bearer <token>} (401 otherwise). A path that cannot be
 * decoded (a bad {@code %} escape) gets 400. Probes never wait behind queries: the server's own threads answer
 * the probes and the refusals, and hand {@code /metrics}, {@code /lagging} and {@code /experiments} to a
 * separate, bounded query pool; when that pool and its queue are full a query gets 503 with
 * {@code Retry-After}.
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

        /** Why the job gave up, or {@code null} while it has not; {@code /health} reports it. */
        default String failure() {
            return null;
        }

        /** The HTML pages, or {@code null} when this backend has none ({@code /} then answers 404). */
        default Pages pages() {
            return null;
        }

        /** The lagging experiments of the latest census, or {@code null} when this backend keeps none. */
        default LaggingExperiments lagging() {
            return null;
        }
    }

    /** Threads that answer queries. */
    static final int QUERY_THREADS = 2;
    /** Queries that may wait for a query thread before the next gets 503. */
    static final int QUERY_QUEUE = 32;

    /** Content type of the Prometheus text format, version 0.0.4. */
    public static final String PROMETHEUS_TEXT = "text/plain; version=0.0.4; charset=utf-8";

    private static final Logger LOG = LoggerFactory.getLogger(StatusServer.class);
    private static final String EXPERIMENTS = "/experiments/";
    private static final String TEXT = "text/plain; charset=utf-8";
    private static final String HTML = "text/html; charset=utf-8";
    private static final ObjectMapper JSON = new ObjectMapper();

    private final HttpServer server;
    private final ExecutorService executor;
    private final ExecutorService queries;
    private final Backend backend;
    private final Optional<byte[]> token;

    private StatusServer(HttpServer server, ExecutorService executor, ExecutorService queries, Backend backend,
                         Optional<String> token) {
        this.server = server;
        this.executor = executor;
        this.queries = queries;
        this.backend = backend;
        this.token = token.map(t -> ("Bearer " + t).getBytes(StandardCharsets.UTF_8));
    }

    /** {@link #start(String, int, Optional, Backend)} on the loopback address, without a token. */
    public static StatusServer start(int port, Backend backend) {
        return start(SafetySettings.BIND_ADDRESS, port, Optional.empty(), backend);
    }

    /**
     * Starts serving on {@code port} of {@code address} (0: a free port, see {@link #port()}), requiring
     * {@code token} (if present) for every path but the probes.
     *
     * @throws UncheckedIOException when the address or port cannot be bound
     */
    public static StatusServer start(String address, int port, Optional<String> token, Backend backend) {
        HttpServer server;
        try {
            server = HttpServer.create(new InetSocketAddress(address, port), 0);
        } catch (IOException | RuntimeException e) {
            throw new UncheckedIOException("cannot listen on HTTP " + address + ":" + port + ": " + e.getMessage(),
                    e instanceof IOException io ? io : new IOException(e));
        }
        ExecutorService executor = Executors.newFixedThreadPool(2, daemon("runoff-http"));
        ExecutorService queries = new ThreadPoolExecutor(QUERY_THREADS, QUERY_THREADS, 0, TimeUnit.MILLISECONDS,
                new ArrayBlockingQueue<>(QUERY_QUEUE), daemon("runoff-http-query"));
        StatusServer status = new StatusServer(server, executor, queries, backend, token);
        server.createContext("/", status::handle);
        server.setExecutor(executor);
        server.start();
        LOG.info("HTTP endpoint listening on {}:{} (token {})", address, status.port(),
                token.isPresent() ? "required except for /health and /ready" : "not required");
        return status;
    }

    private static ThreadFactory daemon(String name) {
        return r -> {
            Thread t = new Thread(r, name);
            t.setDaemon(true);
            return t;
        };
    }

    /** The address the server listens on, e.g. {@code 127.0.0.1}. */
    public String address() {
        return server.getAddress().getAddress().getHostAddress();
    }

    /** The port the server listens on. */
    public int port() {
        return server.getAddress().getPort();
    }

    /**
     * Stops serving: queries in flight get at most a second to finish, then the server stops at once. (The
     * JDK server's own {@code stop(delay)} was measured to wait about the whole delay even with nothing in
     * flight, a second at every shutdown.)
     */
    @Override
    public void close() {
        queries.shutdown();
        try {
            queries.awaitTermination(1, TimeUnit.SECONDS);
        } catch (InterruptedException e) {
            Thread.currentThread().interrupt();
        }
        server.stop(0);
        queries.shutdownNow();
        executor.shutdownNow();
    }

    /** On a server thread: answers probes and refusals at once, hands queries to the query pool. */
    private void handle(HttpExchange exchange) {
        boolean handedOver = false;
        try {
            String method = exchange.getRequestMethod();
            String path = exchange.getRequestURI().getRawPath();
            if (!"GET".equals(method) && !"HEAD".equals(method)) {
                exchange.getResponseHeaders().add("Allow", "GET, HEAD");
                send(exchange, 405, TEXT, "method not allowed\n");
            } else if ("/health".equals(path)) {
                health(exchange);
            } else if ("/ready".equals(path)) {
                state(exchange, backend.state() == KafkaStreams.State.RUNNING, null);
            } else if (!authorized(exchange)) {
                exchange.getResponseHeaders().add("WWW-Authenticate", "Bearer");
                send(exchange, 401, TEXT, "a bearer token is required (Authorization: Bearer <token>)\n");
            } else {
                handedOver = submit(exchange, path);
            }
        } catch (IOException | RuntimeException e) {
            fail(exchange, e);
        } finally {
            if (!handedOver) {
                exchange.close();
            }
        }
    }

    private boolean authorized(HttpExchange exchange) {
        if (token.isEmpty()) {
            return true;
        }
        String given = exchange.getRequestHeaders().getFirst("Authorization");
        return given != null && MessageDigest.isEqual(token.get(), given.getBytes(StandardCharsets.UTF_8));
    }

    /** Queues the query; false (and a 503 sent) when the pool is full. */
    private boolean submit(HttpExchange exchange, String path) throws IOException {
        try {
            queries.execute(() -> query(exchange, path));
            return true;
        } catch (RejectedExecutionException e) {
            exchange.getResponseHeaders().add("Retry-After", "1");
            send(exchange, 503, TEXT, "busy: too many queries in flight, retry\n");
            return false;
        }
    }

    private void query(HttpExchange exchange, String path) {
        try (exchange) {
            route(exchange, path);
        } catch (IOException | RuntimeException e) {
            fail(exchange, e);
        }
    }

    private static void fail(HttpExchange exchange, Exception e) {
        LOG.warn("HTTP request {} failed: {}", exchange.getRequestURI(), e.toString());
        try {
            send(exchange, 500, TEXT, "internal error\n");
        } catch (IOException | RuntimeException ignored) {
            // the response had started or the client left; nothing more to tell it
        }
    }

    private void route(HttpExchange exchange, String path) throws IOException {
        Pages pages = backend.pages();
        String query = exchange.getRequestURI().getRawQuery();
        if ("/metrics".equals(path)) {
            send(exchange, 200, PROMETHEUS_TEXT, backend.metrics());
        } else if ("/lagging".equals(path)) {
            lagging(exchange, backend.lagging());
        } else if ("/".equals(path) && pages != null) {
            page(exchange, pages.overview(query));
        } else if (path.startsWith(EXPERIMENTS) && path.length() > EXPERIMENTS.length()) {
            Optional<String> id = decode(path.substring(EXPERIMENTS.length()));
            if (id.isEmpty()) {
                send(exchange, 400, TEXT, "malformed path: a % must be followed by two hex digits of UTF-8\n");
            } else if (pages != null && wantsHtml(exchange)) {
                page(exchange, pages.experiment(id.get(), query));
            } else {
                experiment(exchange, id.get());
            }
        } else {
            send(exchange, 404, TEXT, "not found: try /, /health, /ready, /metrics, /lagging or /experiments/{id}\n");
        }
    }

    /**
     * Whether the client asked for a page: its {@code Accept} header names {@code text/html} and not
     * {@code application/json}. Clients that send no {@code Accept}, or {@code *}{@code /*}, keep getting JSON.
     */
    static boolean wantsHtml(HttpExchange exchange) {
        String accept = String.join(",", exchange.getRequestHeaders().getOrDefault("Accept", List.of()))
                .toLowerCase(Locale.ROOT);
        return accept.contains("text/html") && !accept.contains("application/json");
    }

    private static void page(HttpExchange exchange, Pages.Page page) throws IOException {
        exchange.getResponseHeaders().add("Vary", "Accept");
        exchange.getResponseHeaders().add("Cache-Control", "no-store");
        send(exchange, page.status(), HTML, page.html());
    }

    /** The percent-decoded path segment, or empty when an escape is malformed. */
    static Optional<String> decode(String raw) {
        try {
            return Optional.of(URLDecoder.decode(raw, StandardCharsets.UTF_8));
        } catch (IllegalArgumentException e) {
            return Optional.empty();
        }
    }

    private static boolean alive(KafkaStreams.State state) {
        return state != KafkaStreams.State.ERROR && state != KafkaStreams.State.PENDING_ERROR
                && state != KafkaStreams.State.NOT_RUNNING;
    }

    private void health(HttpExchange exchange) throws IOException {
        String failure = backend.failure();
        state(exchange, failure == null && alive(backend.state()), failure);
    }

    private void state(HttpExchange exchange, boolean ok, String cause) throws IOException {
        ObjectNode body = JSON.createObjectNode().put("status", ok ? "UP" : "DOWN")
                .put("state", backend.state().name());
        if (cause != null) {
            body.put("cause", cause);
        }
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

    private static void lagging(HttpExchange exchange, LaggingExperiments lagging) throws IOException {
        if (lagging == null) {
            send(exchange, 404, TEXT, "not found: this instance keeps no census of lagging experiments\n");
            return;
        }
        ObjectNode body = JSON.createObjectNode().put("lagging", lagging.count())
                .put("truncated", lagging.truncated()).put("scannedAt", lagging.scannedAtMillis());
        ArrayNode ids = body.putArray("experimentIds");
        lagging.ids().forEach(ids::add);
        sendJson(exchange, 200, body);
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
