package dev.runoff.job;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.IOException;
import java.net.URI;
import java.net.http.HttpClient;
import java.net.http.HttpRequest;
import java.net.http.HttpResponse;
import java.util.List;
import java.util.concurrent.atomic.AtomicReference;
import org.apache.kafka.streams.KafkaStreams;
import org.junit.jupiter.api.AfterEach;
import org.junit.jupiter.api.BeforeEach;
import org.junit.jupiter.api.Test;

/** The HTTP endpoint's routes and status codes against a scripted backend. */
class StatusServerTest {

    private final AtomicReference<KafkaStreams.State> state = new AtomicReference<>(KafkaStreams.State.CREATED);
    private final AtomicReference<Lookup> lookup = new AtomicReference<>(new Lookup.NotFound());
    private final AtomicReference<String> askedFor = new AtomicReference<>();
    private final HttpClient client = HttpClient.newBuilder().followRedirects(HttpClient.Redirect.NEVER).build();
    private StatusServer server;

    @BeforeEach
    void start() {
        server = StatusServer.start(0, new StatusServer.Backend() {
            @Override
            public KafkaStreams.State state() {
                return state.get();
            }

            @Override
            public String metrics() {
                return "# TYPE runoff_duplicates_total counter\nrunoff_duplicates_total 3.0\n";
            }

            @Override
            public Lookup experiment(String id) {
                askedFor.set(id);
                return lookup.get();
            }
        });
    }

    @AfterEach
    void stop() {
        server.close();
    }

    private HttpResponse<String> get(String path) throws IOException, InterruptedException {
        return send("GET", path);
    }

    private HttpResponse<String> send(String method, String path) throws IOException, InterruptedException {
        HttpRequest request = HttpRequest.newBuilder(URI.create("http://127.0.0.1:" + server.port() + path))
                .method(method, HttpRequest.BodyPublishers.noBody()).build();
        return client.send(request, HttpResponse.BodyHandlers.ofString());
    }

    @Test
    void readyOnlyWhileRunningHealthyUnlessFailedOrStopped() throws Exception {
        for (KafkaStreams.State s : KafkaStreams.State.values()) {
            state.set(s);
            int ready = get("/ready").statusCode();
            int health = get("/health").statusCode();
            assertEquals(s == KafkaStreams.State.RUNNING ? 200 : 503, ready, "ready in " + s);
            boolean dead = s == KafkaStreams.State.ERROR || s == KafkaStreams.State.PENDING_ERROR
                    || s == KafkaStreams.State.NOT_RUNNING;
            assertEquals(dead ? 503 : 200, health, "health in " + s);
        }
        state.set(KafkaStreams.State.REBALANCING);
        assertEquals("{\"status\":\"DOWN\",\"state\":\"REBALANCING\"}", get("/ready").body().trim());
    }

    @Test
    void metricsUseThePrometheusTextContentType() throws Exception {
        HttpResponse<String> r = get("/metrics");
        assertEquals(200, r.statusCode());
        // Prometheus exposition formats: text format version 0.0.4 content type
        assertEquals(List.of("text/plain; version=0.0.4; charset=utf-8"), r.headers().allValues("Content-Type"));
        assertTrue(r.body().contains("runoff_duplicates_total 3.0"));
    }

    @Test
    void experimentsAnswerFoundNotFoundElsewhereAndUnavailable() throws Exception {
        lookup.set(new Lookup.Found("{\"experimentId\":\"e 1\"}"));
        HttpResponse<String> found = get("/experiments/e%201");
        assertEquals(200, found.statusCode());
        assertEquals("e 1", askedFor.get());
        assertEquals("{\"experimentId\":\"e 1\"}", found.body());

        lookup.set(new Lookup.NotFound());
        HttpResponse<String> missing = get("/experiments/nope");
        assertEquals(404, missing.statusCode());
        assertTrue(missing.body().contains("\"experimentId\":\"nope\""), missing.body());

        lookup.set(new Lookup.Elsewhere("runoff-1.runoff-headless:8080", List.of("runoff-2.runoff-headless:8080")));
        HttpResponse<String> moved = get("/experiments/e%201");
        assertEquals(307, moved.statusCode());
        assertEquals("http://runoff-1.runoff-headless:8080/experiments/e%201",
                moved.headers().firstValue("Location").orElseThrow());
        assertTrue(moved.body().contains("\"activeHost\":\"runoff-1.runoff-headless:8080\""), moved.body());
        assertTrue(moved.body().contains("\"standbyHosts\":[\"runoff-2.runoff-headless:8080\"]"), moved.body());

        lookup.set(new Lookup.Unavailable("rebalancing"));
        HttpResponse<String> busy = get("/experiments/x");
        assertEquals(503, busy.statusCode());
        assertEquals("1", busy.headers().firstValue("Retry-After").orElseThrow());
    }

    @Test
    void unknownPathsAndMethodsAreRefused() throws Exception {
        assertEquals(404, get("/healthz").statusCode());
        assertEquals(404, get("/experiments/").statusCode());
        assertEquals(404, get("/").statusCode());
        HttpResponse<String> post = send("POST", "/health");
        assertEquals(405, post.statusCode());
        assertEquals("GET, HEAD", post.headers().firstValue("Allow").orElseThrow());
        state.set(KafkaStreams.State.RUNNING);
        HttpResponse<String> head = send("HEAD", "/ready");
        assertEquals(200, head.statusCode());
        assertEquals("", head.body());
    }
}
