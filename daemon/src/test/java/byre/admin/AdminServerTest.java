package byre.admin;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import byre.config.Secret;
import byre.daemon.HealthSnapshot;
import byre.rules.ZoneReading;
import byre.units.Quantity;
import io.micrometer.core.instrument.Counter;
import io.micrometer.prometheusmetrics.PrometheusConfig;
import io.micrometer.prometheusmetrics.PrometheusMeterRegistry;
import java.net.URI;
import java.net.http.HttpClient;
import java.net.http.HttpRequest;
import java.net.http.HttpResponse;
import java.time.Clock;
import java.time.Duration;
import java.time.Instant;
import java.time.ZoneOffset;
import java.util.List;
import java.util.concurrent.atomic.AtomicLong;
import java.util.concurrent.atomic.AtomicReference;
import org.junit.jupiter.api.AfterEach;
import org.junit.jupiter.api.BeforeEach;
import org.junit.jupiter.api.Test;

/** The admin API on a real loopback HTTP server: metrics, health verdicts, status JSON, and the guarded acknowledgement. */
class AdminServerTest {
    static final Instant NOW = Instant.parse("2026-07-14T14:05:00Z");
    static final HealthSnapshot GOOD = new HealthSnapshot(true, "", true, "", 100, 0, 10, 0);

    final AtomicReference<HealthSnapshot> snapshot = new AtomicReference<>(GOOD);
    final AtomicLong nanos = new AtomicLong();
    final PrometheusMeterRegistry registry = new PrometheusMeterRegistry(PrometheusConfig.DEFAULT);
    final LiveValues live = new LiveValues();
    final HttpClient http = HttpClient.newHttpClient();
    AdminServer server;

    @BeforeEach
    void start() throws Exception {
        HealthMonitor health = new HealthMonitor(snapshot::get, nanos::get, Duration.ofMinutes(5), Duration.ofSeconds(30));
        server = AdminServer.start("127.0.0.1", 0, new Secret("s3cret-token\n", "test"), registry::scrape, health, live,
                Clock.fixed(NOW, ZoneOffset.UTC), "larkmoor");
    }

    @AfterEach
    void stop() {
        server.close();
    }

    HttpResponse<String> get(String path) throws Exception {
        return http.send(HttpRequest.newBuilder(URI.create("http://127.0.0.1:" + server.port() + path)).GET().build(),
                HttpResponse.BodyHandlers.ofString());
    }

    HttpResponse<String> ack(String body, String auth) throws Exception {
        HttpRequest.Builder b = HttpRequest.newBuilder(URI.create("http://127.0.0.1:" + server.port() + "/ack"))
                .POST(HttpRequest.BodyPublishers.ofString(body));
        if (auth != null) b.header("Authorization", auth);
        return http.send(b.build(), HttpResponse.BodyHandlers.ofString());
    }

    @Test
    void metricsAreThePrometheusScrape() throws Exception {
        Counter.builder("byre.readings.received").tag("sensor", "pen1-dry").register(registry).increment(3);
        HttpResponse<String> r = get("/metrics");
        assertEquals(200, r.statusCode());
        assertTrue(r.headers().firstValue("Content-Type").orElse("").startsWith("text/plain"), r.headers().toString());
        assertTrue(r.body().contains("byre_readings_received_total{sensor=\"pen1-dry\"} 3.0"), r.body());
    }

    @Test
    void healthIs503WithReasonsOnlyWhenSomethingIsWrong() throws Exception {
        assertEquals(200, get("/health").statusCode());
        assertEquals("{\"healthy\":true,\"problems\":[]}\n", get("/health").body());

        // The broker drops: still healthy while reconnecting within the 5-minute grace...
        snapshot.set(new HealthSnapshot(false, "cannot reach the broker", true, "", 100, 0, 10, 0));
        assertEquals(200, get("/health").statusCode());
        nanos.addAndGet(Duration.ofMinutes(4).toNanos());
        assertEquals(200, get("/health").statusCode());
        // ...and unhealthy after it.
        nanos.addAndGet(Duration.ofMinutes(2).toNanos());
        HttpResponse<String> r = get("/health");
        assertEquals(503, r.statusCode());
        assertTrue(r.body().contains("broker: not connected for 360 s (cannot reach the broker)"), r.body());

        snapshot.set(new HealthSnapshot(true, "", false, "disk full", 45_000, 12, 10, 300));
        r = get("/health");
        assertEquals(503, r.statusCode());
        assertTrue(r.body().contains("history: writes failing (disk full); 300 rows waiting"), r.body());
        assertTrue(r.body().contains("pipeline: no progress for 45 s with 12 zone readings queued"), r.body());

        // Reconnected: the grace clock starts again from zero at the next drop.
        snapshot.set(GOOD);
        assertEquals(200, get("/health").statusCode());
        snapshot.set(new HealthSnapshot(false, "x", true, "", 100, 0, 10, 0));
        assertEquals(200, get("/health").statusCode());
    }

    @Test
    void statusListsZoneValuesWithAgesAndAlertsOncePluggedIn() throws Exception {
        live.accept(new ZoneReading(NOW.minusSeconds(42), "cow-shed", Quantity.THI, 73.4));
        live.accept(new ZoneReading(NOW.minusSeconds(90), "cow-shed", Quantity.THI, 70.0)); // older: ignored
        live.accept(new ZoneReading(NOW.minusSeconds(5), "calf-pen-1", Quantity.DRY_BULB, 5.0));
        String body = get("/status").body();
        assertEquals("{\"site\":\"larkmoor\",\"at\":\"2026-07-14T14:05:00Z\",\"zones\":{"
                + "\"calf-pen-1\":{\"dry-bulb\":{\"value\":5,\"unit\":\"C\",\"at\":\"2026-07-14T14:04:55Z\",\"age\":5}},"
                + "\"cow-shed\":{\"thi\":{\"value\":73.4,\"unit\":\"\",\"at\":\"2026-07-14T14:04:18Z\",\"age\":42}}},"
                + "\"alerts\":null}\n", body);
        server.setAlertSource(() -> List.of(new OpenAlert("inc-7", "heat-stress", "cow-shed", "warning", "thi", 73.4,
                Instant.parse("2026-07-14T13:05:00Z"), "sam", Instant.parse("2026-07-14T13:20:00Z"))));
        body = get("/status").body();
        assertTrue(body.contains("\"alerts\":[{\"incident\":\"inc-7\",\"watch\":\"heat-stress\",\"zone\":\"cow-shed\",\"level\":\"warning\","
                + "\"quantity\":\"thi\",\"value\":73.4,\"since\":\"2026-07-14T13:05:00Z\",\"acknowledged-by\":\"sam\","
                + "\"acknowledged-at\":\"2026-07-14T13:20:00Z\"}]"), body);
    }

    @Test
    void ackNeedsTheBearerTokenAndAHandler() throws Exception {
        String body = "{\"incident\":\"inc-7\",\"by\":\"sam\"}";
        assertEquals(401, ack(body, null).statusCode());
        assertEquals(401, ack(body, "Bearer wrong").statusCode());
        HttpResponse<String> noHandler = ack(body, "Bearer s3cret-token");
        assertEquals(404, noHandler.statusCode());
        assertFalse(noHandler.body().contains("s3cret"), noHandler.body());

        AtomicReference<String> seen = new AtomicReference<>();
        server.setAckHandler((incident, by) -> {
            seen.set(incident + " by " + by);
            return incident.equals("inc-7") ? AckHandler.Result.acknowledged("acknowledged") : AckHandler.Result.unknown("no such incident");
        });
        HttpResponse<String> ok = ack(body, "Bearer s3cret-token");
        assertEquals(200, ok.statusCode());
        assertEquals("{\"outcome\":\"acknowledged\",\"message\":\"acknowledged\"}\n", ok.body());
        assertEquals("inc-7 by sam", seen.get());
        assertEquals(404, ack("{\"incident\":\"inc-9\"}", "Bearer s3cret-token").statusCode());
        assertEquals(400, ack("not json", "Bearer s3cret-token").statusCode());
        assertEquals(413, ack("{\"incident\":\"" + "x".repeat(5000) + "\"}", "Bearer s3cret-token").statusCode());
        assertEquals(405, http.send(HttpRequest.newBuilder(URI.create("http://127.0.0.1:" + server.port() + "/ack")).GET().build(),
                HttpResponse.BodyHandlers.ofString()).statusCode());
        assertEquals(404, get("/nothing").statusCode());
    }

    @Test
    void historyWriteRunsTheWriterAtMostOnceInTenSeconds() throws Exception {
        java.util.concurrent.atomic.AtomicInteger writes = new java.util.concurrent.atomic.AtomicInteger();
        HttpRequest post = HttpRequest.newBuilder(URI.create("http://127.0.0.1:" + server.port() + "/history/write"))
                .POST(HttpRequest.BodyPublishers.noBody()).build();
        assertEquals(404, http.send(post, HttpResponse.BodyHandlers.ofString()).statusCode(), "no history plugged in");
        server.setHistoryWrite(writes::incrementAndGet);
        HttpResponse<String> first = http.send(post, HttpResponse.BodyHandlers.ofString());
        assertEquals(200, first.statusCode());
        assertEquals("{\"written\":true}\n", first.body());
        // The clock is fixed: a second call within the ten seconds writes nothing (a loop of calls cannot wear the card).
        assertEquals("{\"written\":false}\n", http.send(post, HttpResponse.BodyHandlers.ofString()).body());
        assertEquals(1, writes.get());
        assertEquals(405, get("/history/write").statusCode());
    }

    @Test
    void theBearerSchemeIsCaseInsensitiveAndTheTokenIsNot() throws Exception {
        server.setAckHandler((incident, by) -> AckHandler.Result.acknowledged("acknowledged"));
        String body = "{\"incident\":\"inc-7\",\"by\":\"sam\"}";
        assertEquals(200, ack(body, "bearer s3cret-token").statusCode());
        assertEquals(200, ack(body, "BEARER  s3cret-token").statusCode());
        assertEquals(401, ack(body, "Bearer S3CRET-TOKEN").statusCode());
        assertEquals(401, ack(body, "Basic s3cret-token").statusCode());
        assertEquals(401, ack(body, "Bearers3cret-token").statusCode());
    }

    @Test
    void theNameOfWhoAcknowledgedCannotForgeALogLine() throws Exception {
        AtomicReference<String> seen = new AtomicReference<>();
        server.setAckHandler((incident, by) -> {
            seen.set(by);
            return AckHandler.Result.acknowledged("acknowledged");
        });
        String forged = "sam\\nINFO  AlertStage - cleared warning heat-stress cows\\u001b[2K" + "x".repeat(100);
        assertEquals(200, ack("{\"incident\":\"inc-7\",\"by\":\"" + forged + "\"}", "Bearer s3cret-token").statusCode());
        assertTrue(seen.get().startsWith("sam INFO AlertStage - cleared warning heat-stress cows [2Kxxx"), seen.get());
        assertEquals(64, seen.get().length(), seen.get());
        assertFalse(seen.get().chars().anyMatch(Character::isISOControl), seen.get());
    }

    /** Opens connections that send part of a request and then nothing, as a stalled phone or a hostile device would. */
    List<java.net.Socket> stalledClients(int port) throws Exception {
        List<java.net.Socket> out = new java.util.ArrayList<>();
        for (String partial : List.of("POST /ack HTTP/1.1\r\nHost: x\r\nAuthorization: Bearer s3cret-token\r\nContent-Length: 40\r\n\r\n{\"inc",
                "GET /health HTTP/1.1\r\nHost: x\r\nX-Slow: ")) {
            java.net.Socket s = new java.net.Socket("127.0.0.1", port);
            s.getOutputStream().write(partial.getBytes(java.nio.charset.StandardCharsets.US_ASCII));
            s.getOutputStream().flush();
            out.add(s);
        }
        return out;
    }

    @Test
    void twoStalledClientsDoNotKeepHealthFromAnswering() throws Exception {
        List<java.net.Socket> slow = new java.util.ArrayList<>(stalledClients(server.port()));
        slow.addAll(stalledClients(server.port()));
        try {
            Thread.sleep(100); // let the server hand the stalled requests to its workers
            HttpResponse<String> r = http.send(HttpRequest.newBuilder(URI.create("http://127.0.0.1:" + server.port() + "/health"))
                    .timeout(Duration.ofSeconds(1)).GET().build(), HttpResponse.BodyHandlers.ofString());
            assertEquals(200, r.statusCode());
        } finally {
            for (java.net.Socket s : slow) s.close();
        }
    }

    @Test
    void aRequestThatDoesNotArriveWithinTheReadTimeoutIsCutOff() throws Exception {
        HealthMonitor health = new HealthMonitor(snapshot::get, nanos::get, Duration.ofMinutes(5), Duration.ofSeconds(30));
        try (AdminServer quick = AdminServer.start("127.0.0.1", 0, new Secret("s3cret-token", "test"), registry::scrape, health, live,
                Clock.fixed(NOW, ZoneOffset.UTC), "larkmoor", Duration.ofMillis(200))) {
            quick.setAckHandler((incident, by) -> AckHandler.Result.acknowledged("acknowledged"));
            for (java.net.Socket s : stalledClients(quick.port())) {
                try (s) {
                    s.setSoTimeout(5000); // bounded wait: the server closes the connection long before
                    int first;
                    try {
                        first = s.getInputStream().read();
                    } catch (java.net.SocketException reset) {
                        first = -1;
                    }
                    assertEquals(-1, first, "the stalled connection is closed without an answer");
                }
            }
            // ...and a whole request still gets its answer.
            HttpResponse<String> r = http.send(HttpRequest.newBuilder(URI.create("http://127.0.0.1:" + quick.port() + "/ack"))
                    .header("Authorization", "Bearer s3cret-token").POST(HttpRequest.BodyPublishers.ofString("{\"incident\":\"inc-7\"}"))
                    .build(), HttpResponse.BodyHandlers.ofString());
            assertEquals(200, r.statusCode(), r.body());
        }
    }
}
