package dev.runoff.job;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.BufferedReader;
import java.io.IOException;
import java.io.InputStreamReader;
import java.net.Socket;
import java.nio.charset.StandardCharsets;
import java.time.Duration;
import java.util.ArrayList;
import java.util.Optional;
import java.util.concurrent.CompletableFuture;
import java.util.concurrent.CountDownLatch;
import java.util.concurrent.TimeUnit;
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
    private final AtomicReference<LaggingExperiments> lagging = new AtomicReference<>(new LaggingExperiments(0));
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

            @Override
            public LaggingExperiments lagging() {
                return lagging.get();
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
    void laggingNamesTheLaggingExperimentsOfTheLatestCensusUpToItsListBound() throws Exception {
        LaggingExperiments few = new LaggingExperiments(1_700_000_000_000L);
        few.add("hero banner");
        few.add("checkout");
        lagging.set(few);
        HttpResponse<String> response = get("/lagging");
        assertEquals(200, response.statusCode());
        assertEquals("application/json", response.headers().firstValue("Content-Type").orElseThrow());
        assertEquals("{\"lagging\":2,\"truncated\":false,\"scannedAt\":1700000000000,"
                + "\"experimentIds\":[\"hero banner\",\"checkout\"]}\n", response.body());

        LaggingExperiments many = new LaggingExperiments(1L);
        for (int i = 0; i < LaggingExperiments.MAX_LISTED + 5; i++) {
            many.add("e" + i);
        }
        lagging.set(many);
        String body = get("/lagging").body();
        assertTrue(body.startsWith("{\"lagging\":1005,\"truncated\":true,"), body);
        assertTrue(body.contains("\"e999\"]"), body);
        assertFalse(body.contains("\"e1000\""), body);
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

    @Test
    void aMalformedPercentEscapeIsABadRequestNotAnInternalError() throws Exception {
        // RFC 3986 section 2.1: a percent-encoded octet is "%" followed by two hexadecimal digits
        assertEquals(400, rawStatus("/experiments/%zz"));
        assertEquals(400, rawStatus("/experiments/abc%"));
        assertEquals(null, askedFor.get(), "the backend was never asked");
        // the JDK server already answers 400 to a request URI it cannot parse; the decoder refuses on its own too
        assertEquals(Optional.empty(), StatusServer.decode("abc%"));
        assertEquals(Optional.empty(), StatusServer.decode("%zz"));
        assertEquals(Optional.of("e 1"), StatusServer.decode("e%201"));
    }

    @Test
    void healthReportsDownWithTheCauseOnceTheJobGaveUp() throws Exception {
        server.close();
        AtomicReference<String> failure = new AtomicReference<>();
        server = StatusServer.start(0, new ScriptedBackend() {
            @Override
            public String failure() {
                return failure.get();
            }
        });
        state.set(KafkaStreams.State.RUNNING);
        assertEquals(200, get("/health").statusCode());
        failure.set("stream thread failed 4 times within 600000 ms: boom");
        HttpResponse<String> down = get("/health");
        assertEquals(503, down.statusCode());
        assertTrue(down.body().contains("\"cause\":\"stream thread failed 4 times within 600000 ms: boom\""),
                down.body());
    }

    @Test
    void aTokenGuardsEverythingButTheProbes() throws Exception {
        server.close();
        server = StatusServer.start("127.0.0.1", 0, Optional.of("s3cret"), new ScriptedBackend());
        state.set(KafkaStreams.State.RUNNING);
        assertEquals(200, get("/health").statusCode());
        assertEquals(200, get("/ready").statusCode());
        HttpResponse<String> anonymous = get("/metrics");
        assertEquals(401, anonymous.statusCode());
        assertEquals("Bearer", anonymous.headers().firstValue("WWW-Authenticate").orElseThrow());
        assertEquals(401, get("/experiments/x").statusCode());
        assertEquals(401, withToken("/metrics", "Bearer wrong").statusCode());
        assertEquals(200, withToken("/metrics", "Bearer s3cret").statusCode());
        assertEquals(404, withToken("/experiments/x", "Bearer s3cret").statusCode());
        assertEquals("x", askedFor.get());
    }

    @Test
    void itListensOnlyOnTheConfiguredAddress() throws Exception {
        assertEquals("127.0.0.1", server.address());
    }

    @Test
    void probesAnswerWhileEveryQueryThreadIsBusy() throws Exception {
        server.close();
        CountDownLatch release = new CountDownLatch(1);
        CountDownLatch busy = new CountDownLatch(StatusServer.QUERY_THREADS);
        server = StatusServer.start(0, new ScriptedBackend() {
            @Override
            public Lookup experiment(String id) {
                busy.countDown();
                try {
                    release.await();
                } catch (InterruptedException e) {
                    Thread.currentThread().interrupt();
                }
                return new Lookup.NotFound();
            }
        });
        try {
            List<CompletableFuture<HttpResponse<String>>> slow = new ArrayList<>();
            for (int i = 0; i < StatusServer.QUERY_THREADS + 4; i++) {
                slow.add(client.sendAsync(request("/experiments/slow" + i), HttpResponse.BodyHandlers.ofString()));
            }
            assertTrue(busy.await(30, TimeUnit.SECONDS), "every query thread is blocked");
            state.set(KafkaStreams.State.RUNNING);
            assertEquals(200, client.send(request("/health"), HttpResponse.BodyHandlers.ofString()).statusCode());
            assertEquals(200, client.send(request("/ready"), HttpResponse.BodyHandlers.ofString()).statusCode());
            release.countDown();
            for (CompletableFuture<HttpResponse<String>> f : slow) {
                assertEquals(404, f.get(30, TimeUnit.SECONDS).statusCode());
            }
        } finally {
            release.countDown();
        }
    }

    private HttpRequest request(String path) {
        return HttpRequest.newBuilder(URI.create("http://127.0.0.1:" + server.port() + path))
                .timeout(Duration.ofSeconds(30)).build();
    }

    private HttpResponse<String> withToken(String path, String authorization) throws Exception {
        HttpRequest request = HttpRequest.newBuilder(URI.create("http://127.0.0.1:" + server.port() + path))
                .header("Authorization", authorization).build();
        return client.send(request, HttpResponse.BodyHandlers.ofString());
    }

    /** The status code of a GET of {@code rawPath} sent as is (HttpClient refuses to send a malformed URI). */
    private int rawStatus(String rawPath) throws IOException {
        try (Socket socket = new Socket("127.0.0.1", server.port())) {
            socket.getOutputStream().write(("GET " + rawPath + " HTTP/1.1\r\nHost: localhost\r\n"
                    + "Connection: close\r\n\r\n").getBytes(StandardCharsets.US_ASCII));
            String status = new BufferedReader(new InputStreamReader(socket.getInputStream(),
                    StandardCharsets.US_ASCII)).readLine();
            return Integer.parseInt(status.split(" ")[1]);
        }
    }

    /** The scripted backend of the fields above. */
    private class ScriptedBackend implements StatusServer.Backend {
        @Override
        public KafkaStreams.State state() {
            return state.get();
        }

        @Override
        public String metrics() {
            return "";
        }

        @Override
        public Lookup experiment(String id) {
            askedFor.set(id);
            return lookup.get();
        }
    }
}
