package dev.runoff.job.pages;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.runoff.engine.stats.ArmStats;
import dev.runoff.engine.stats.BernoulliStats;
import dev.runoff.job.Lookup;
import dev.runoff.job.StatusServer;
import dev.runoff.testkit.TestDefinitions;
import java.net.URI;
import java.net.http.HttpClient;
import java.net.http.HttpRequest;
import java.net.http.HttpResponse;
import java.util.Optional;
import org.apache.kafka.streams.KafkaStreams;
import org.junit.jupiter.api.AfterEach;
import org.junit.jupiter.api.BeforeEach;
import org.junit.jupiter.api.Test;

/** Which requests get a page and which keep getting JSON, and the token in front of both. */
class PagesEndpointTest {

    private static final String JSON = "{\"experimentId\":\"fares\"}";
    /** What Chromium sends for a page it navigates to (from memory). */
    private static final String BROWSER = "text/html,application/xhtml+xml,application/xml;q=0.9,image/avif,"
            + "image/webp,image/apng,*/*;q=0.8";

    private final HttpClient client = HttpClient.newHttpClient();
    private StatusServer server;

    @BeforeEach
    void start() {
        DecisionHistory history = new DecisionHistory();
        DecisionChains.run(TestDefinitions.bernoulli("fares", "grid", "list"), 4,
                d -> new ArmStats[] {new BernoulliStats(30, 2), new BernoulliStats(30, 4)}).forEach(history::add);
        Pages pages = new Pages(history, "runoff.decisions");
        server = StatusServer.start("127.0.0.1", 0, Optional.of("s3cret"), new StatusServer.Backend() {
            @Override
            public KafkaStreams.State state() {
                return KafkaStreams.State.RUNNING;
            }

            @Override
            public String metrics() {
                return "";
            }

            @Override
            public Lookup experiment(String id) {
                return new Lookup.Found(JSON);
            }

            @Override
            public Pages pages() {
                return pages;
            }
        });
    }

    @AfterEach
    void stop() {
        server.close();
    }

    private HttpResponse<String> get(String path, String accept, boolean token) throws Exception {
        HttpRequest.Builder request = HttpRequest.newBuilder(URI.create("http://127.0.0.1:" + server.port() + path));
        if (accept != null) {
            request.header("Accept", accept);
        }
        if (token) {
            request.header("Authorization", "Bearer s3cret");
        }
        return client.send(request.build(), HttpResponse.BodyHandlers.ofString());
    }

    @Test
    void existingClientsKeepGettingJsonAndBrowsersGetThePage() throws Exception {
        for (String accept : new String[] {null, "*/*", "application/json", "application/json, text/html"}) {
            HttpResponse<String> r = get("/experiments/fares", accept, true);
            assertEquals(200, r.statusCode());
            assertEquals(JSON, r.body(), "Accept: " + accept);
            assertEquals("application/json", r.headers().firstValue("Content-Type").orElseThrow());
        }
        HttpResponse<String> page = get("/experiments/fares", BROWSER, true);
        assertEquals(200, page.statusCode());
        assertEquals("text/html; charset=utf-8", page.headers().firstValue("Content-Type").orElseThrow());
        assertTrue(page.body().contains("<svg") && page.body().contains(">grid"), "the experiment page");
        assertEquals("Accept", page.headers().firstValue("Vary").orElseThrow());
        assertEquals("no-store", page.headers().firstValue("Cache-Control").orElseThrow());
        HttpResponse<String> list = get("/", null, true);
        assertEquals(200, list.statusCode());
        assertTrue(list.body().contains("<a href=\"/experiments/fares\">fares</a>"), list.body());
    }

    @Test
    void pagesNeedTheTokenAsTheJsonDoes() throws Exception {
        assertEquals(401, get("/", BROWSER, false).statusCode());
        assertEquals(401, get("/experiments/fares", BROWSER, false).statusCode());
        assertEquals(401, get("/experiments/fares", null, false).statusCode());
        assertEquals(200, get("/ready", BROWSER, false).statusCode(), "probes stay open");
    }
}
