package byre.notify;

import byre.testing.MutableClock;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import byre.alerts.AlertEvent;
import byre.alerts.AlertPolicy;
import byre.alerts.EventKind;
import byre.alerts.IdSource;
import byre.alerts.WatchOutcome;
import byre.history.HistoryStore;
import byre.json.Json;
import io.micrometer.core.instrument.simple.SimpleMeterRegistry;
import java.net.ServerSocket;
import java.net.URI;
import java.nio.charset.StandardCharsets;
import java.nio.file.Path;
import java.time.Duration;
import java.time.Instant;
import java.util.HexFormat;
import java.util.List;
import java.util.Map;
import java.util.Random;
import javax.crypto.Mac;
import javax.crypto.spec.SecretKeySpec;
import org.junit.jupiter.api.AfterEach;
import org.junit.jupiter.api.BeforeEach;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/** Webhook channel through the outbox and dispatcher against a real HTTP server on 127.0.0.1. */
class WebhookDeliveryTest {
    static final Instant T0 = Instant.parse("2026-07-14T13:35:00Z");
    static final String SECRET = "larkmoor-hook-secret";

    @TempDir
    Path dir;
    Receiver receiver;
    HistoryStore store;
    MutableClock clock = new MutableClock(T0);
    SimpleMeterRegistry registry = new SimpleMeterRegistry();
    AlertService service;

    @BeforeEach
    void setUp() throws Exception {
        receiver = new Receiver();
        store = HistoryStore.open(dir.resolve("history.db"));
    }

    @AfterEach
    void tearDown() {
        if (service != null) service.close();
        store.close();
        receiver.close();
    }

    AlertService service(URI url, Duration timeout) {
        Channel hook = new WebhookChannel("night-phone", url, null, Map.of("X-Farm", "larkmoor"), SECRET, timeout);
        return AlertServices.assemble("larkmoor", Map.of("night-phone", hook), Map.of("night-phone", ChannelFactory.Policy.defaults()),
                new Outbox(store.openSyncedConnection()), store::putState, store::loadState, clock, new Random(7),
                IdSource.counting(), registry, List.of(), Duration.ofMinutes(15), "byre/larkmoor/ack");
    }

    static WatchOutcome raise(String zone) {
        return new WatchOutcome(WatchOutcome.Kind.RAISED, "heat-stress", zone, "warning", "thi", 73.4, "", T0, T0,
                "Heat stress in " + zone + ": THI 73.4.", AlertPolicy.notifyOnly(List.of("night-phone")));
    }

    static String hmacHex(String key, String body) throws Exception {
        Mac mac = Mac.getInstance("HmacSHA256");
        mac.init(new SecretKeySpec(key.getBytes(StandardCharsets.UTF_8), "HmacSHA256"));
        return HexFormat.of().formatHex(mac.doFinal(body.getBytes(StandardCharsets.UTF_8)));
    }

    double failures(String reason) {
        var c = registry.find("byre.notify.failures").tag("reason", reason).counter();
        return c == null ? 0 : c.count();
    }

    @Test
    void hmacMatchesRfc4231TestCase2() {
        // RFC 4231 section 4.3, HMAC-SHA-256 of "what do ya want for nothing?" with key "Jefe"
        assertEquals("5bdcc146bf60754e6a042426089575c75a003f089d2739839dec58b964ec3843",
                Hmac.sha256Hex("Jefe", "what do ya want for nothing?".getBytes(StandardCharsets.UTF_8)));
    }

    @Test
    void postsTheEventJsonSignedWithTheSharedSecret() throws Exception {
        service = service(receiver.url(), Duration.ofSeconds(2));
        service.accept(raise("cows"));
        service.runOnce();
        List<Receiver.Request> got = receiver.requests();
        assertEquals(1, got.size());
        Receiver.Request r = got.get(0);
        Map<?, ?> body = (Map<?, ?>) Json.parse(r.body());
        assertEquals("raised", body.get("event"));
        assertEquals("cows", body.get("zone"));
        assertEquals(73.4, body.get("value"));
        assertEquals("sha256=" + hmacHex(SECRET, r.body()), r.header("X-Byre-Signature"));
        assertEquals("larkmoor", r.header("X-Farm"));
        assertEquals("application/json", r.header("Content-Type"));
        assertEquals(0, service.outbox().depth());
        assertEquals(1.0, registry.find("byre.notify.delivered").counter().count());
    }

    @Test
    void theHttpClientIsMadeAtTheFirstDeliveryNotAtStartUp() {
        // Building the JDK's client reads the trust store and starts a thread: start-up should not wait for it.
        WebhookChannel hook = new WebhookChannel("night-phone", receiver.url(), null, Map.of(), null, Duration.ofSeconds(2));
        assertFalse(hook.clientMade());
        assertTrue(hook.deliver(new AlertEvent("e1", "i1", EventKind.TEST, "larkmoor", "notify-test", "byre", "info", null, Double.NaN, null,
                T0, T0, "test", null, List.of(), List.of())).ok());
        assertTrue(hook.clientMade());
        assertEquals(1, receiver.requests().size());
    }

    @Test
    void postsOverPlainHttp11WithoutAnH2cUpgrade() throws Exception {
        service = service(receiver.url(), Duration.ofSeconds(2));
        service.accept(raise("cows"));
        service.runOnce();
        Receiver.Request r = receiver.requests().get(0);
        // The JDK client's default (HTTP/2) sends "Connection: Upgrade, HTTP2-Settings" and "Upgrade: h2c" on plain http.
        assertEquals(null, r.header("Upgrade"), r.headers().toString());
        assertEquals(null, r.header("HTTP2-Settings"), r.headers().toString());
    }

    @Test
    void theValueIsRoundedToItsMeaningfulDecimalsAndTheMessageIsTheEventText() throws Exception {
        service = service(receiver.url(), Duration.ofSeconds(2));
        List<AlertEvent> seen = new java.util.concurrent.CopyOnWriteArrayList<>();
        service.onEvent(seen::add);
        service.accept(new WatchOutcome(WatchOutcome.Kind.RAISED, "heat-danger", "cow-shed", "critical", "thi", 83.70250000000001, "",
                T0, T0, "Cool the cows now.", AlertPolicy.notifyOnly(List.of("night-phone"))));
        service.runOnce();
        String body = receiver.requests().get(0).body();
        assertTrue(body.contains("\"value\":83.7,"), body);
        // the log and the demo console get the event through onEvent: the very text the webhook carried
        assertEquals(((Map<?, ?>) Json.parse(body)).get("message"), seen.get(0).message());
        assertEquals("ALERT at larkmoor, cow-shed: heat-danger (critical), THI 83.7, danger band. Cool the cows now."
                + " Incident i1; acknowledge: byre ack i1.", ((Map<?, ?>) Json.parse(body)).get("message"));
    }

    @Test
    void retriesAfterHttp500WithBackoffAndReportsStatusAndBody() throws Exception {
        service = service(receiver.url(), Duration.ofSeconds(2));
        receiver.status.set(500);
        service.accept(raise("cows"));
        service.runOnce();
        assertEquals(1, receiver.requests().size());
        Outbox.Row row = service.outbox().head("night-phone").orElseThrow();
        assertEquals(1, row.attempts());
        assertTrue(row.lastError().startsWith("HTTP 500 from " + receiver.url() + ": receiver is having a bad day"), row.lastError());
        long waitMs = Duration.between(T0, row.nextAt()).toMillis();
        assertTrue(waitMs >= 4000 && waitMs <= 6000, "first retry 5 s ± 20 %: " + waitMs);
        service.runOnce();
        assertEquals(1, receiver.requests().size(), "not retried before its time");
        clock.advance(Duration.ofSeconds(6));
        service.runOnce();
        assertEquals(2, receiver.requests().size());
        row = service.outbox().head("night-phone").orElseThrow();
        long second = Duration.between(clock.instant(), row.nextAt()).toMillis();
        assertTrue(second >= 8000 && second <= 12000, "second retry 10 s ± 20 %: " + second);
        assertEquals(2.0, failures("http-status"));
        receiver.status.set(200);
        clock.advance(Duration.ofSeconds(12));
        service.runOnce();
        assertEquals(3, receiver.requests().size());
        assertEquals(0, service.outbox().depth());
    }

    @Test
    void backoffDoublesToTenMinutes() {
        service = service(receiver.url(), Duration.ofSeconds(2));
        Dispatcher d = service.dispatcher();
        long[] expectedSec = {5, 10, 20, 40, 80, 160, 320, 600, 600, 600};
        for (int i = 0; i < expectedSec.length; i++) {
            long ms = d.backoff(i + 1).toMillis();
            long base = expectedSec[i] * 1000;
            assertTrue(ms >= base * 0.8 - 1 && ms <= Math.min(base * 1.2, 600_000) + 1, "attempt " + (i + 1) + ": " + ms);
        }
    }

    @Test
    void aTimeoutIsAFailureAndTheEventIsSentAgain() throws Exception {
        service = service(receiver.url(), Duration.ofMillis(300));
        receiver.delayMs = 1500;
        service.accept(raise("cows"));
        service.runOnce();
        assertEquals(1.0, failures("timeout"));
        receiver.delayMs = 0;
        clock.advance(Duration.ofSeconds(7));
        service.runOnce();
        assertEquals(0, service.outbox().depth());
        // at least once: the slow first request may also have arrived; both carry the same id
        List<Receiver.Request> got = receiver.requests();
        assertTrue(got.size() >= 1);
        assertTrue(got.stream().allMatch(r -> r.body().contains("\"id\":\"e1\"")));
    }

    @Test
    void aRefusedConnectionAndAnUnknownHostAreClassified() throws Exception {
        int closedPort;
        try (ServerSocket s = new ServerSocket(0, 1, java.net.InetAddress.getLoopbackAddress())) {
            closedPort = s.getLocalPort();
        }
        AlertEvent e = new AlertEvent("e1", "i1", EventKind.TEST, "larkmoor", "notify-test", "byre", "info", null, Double.NaN, null,
                T0, T0, "test", null, List.of(), List.of());
        DeliveryResult refused = new WebhookChannel("x", URI.create("http://127.0.0.1:" + closedPort + "/hook"), null, Map.of(), null,
                Duration.ofSeconds(2)).deliver(e);
        assertFalse(refused.ok());
        assertEquals(FailureReason.REFUSED, refused.reason(), refused.toString());
        // RFC 6761: the .invalid top-level domain never resolves
        DeliveryResult dns = new WebhookChannel("x", URI.create("http://hook.larkmoor.invalid/x"), null, Map.of(), null,
                Duration.ofSeconds(3)).deliver(e);
        assertEquals(FailureReason.DNS, dns.reason(), dns.toString());
    }

    @Test
    void refusedThenBackUpDeliversEverythingInOrder() throws Exception {
        int port = receiver.server.getAddress().getPort();
        receiver.close();
        service = service(URI.create("http://127.0.0.1:" + port + "/hook"), Duration.ofSeconds(2));
        service.accept(raise("cows"));
        service.accept(raise("calf-pen-1"));
        service.accept(raise("calf-pen-2"));
        service.runOnce();
        assertEquals(1.0, failures("refused"), "only the head of the channel was tried");
        Receiver back;
        try {
            back = new Receiver(port);
        } catch (java.net.BindException taken) {
            return; // the port was taken meanwhile: nothing to check
        }
        try {
            clock.advance(Duration.ofSeconds(7));
            service.runOnce();
            List<String> zones = back.requests().stream().map(r -> (String) ((Map<?, ?>) Json.parse(r.body())).get("zone")).toList();
            assertEquals(List.of("cows", "calf-pen-1", "calf-pen-2"), zones);
        } finally {
            back.close();
        }
    }

    @Test
    void orderIsKeptWhileTheHeadFails() throws Exception {
        service = service(receiver.url(), Duration.ofSeconds(2));
        receiver.status.set(500);
        service.accept(raise("cows"));
        service.accept(raise("calf-pen-1"));
        service.runOnce();
        clock.advance(Duration.ofSeconds(7));
        service.runOnce();
        assertTrue(receiver.requests().stream().allMatch(r -> r.body().contains("\"zone\":\"cows\"")),
                "the second event waits until the first is delivered");
        receiver.status.set(200);
        clock.advance(Duration.ofSeconds(15));
        service.runOnce();
        List<String> zones = receiver.requests().stream().map(r -> (String) ((Map<?, ?>) Json.parse(r.body())).get("zone")).toList();
        assertEquals(List.of("cows", "cows", "cows", "calf-pen-1"), zones);
    }

    @Test
    void aBodyTemplateFillsThePlaceholders() throws Exception {
        Channel hook = new WebhookChannel("night-phone", receiver.url(), "{\"text\":\"{message} ({zone}, ack {incident})\"}", Map.of(),
                null, Duration.ofSeconds(2));
        AlertEvent e = new AlertEvent("e1", "i1", EventKind.RAISED, "larkmoor", "heat-stress", "cows", "warning", "thi", 73.4, "",
                T0, T0, "Heat \"stress\" in cows", null, List.of(), List.of());
        assertTrue(hook.deliver(e).ok());
        assertEquals("{\"text\":\"Heat \\\"stress\\\" in cows (cows, ack i1)\"}", receiver.requests().get(0).body());
    }

    @Test
    void addressesInMessagesHideTheKeysPushServicesPutInPathAndQuery() {
        String shown = WebhookChannel.shown(java.net.URI.create("https://push.example:8443/hook/s3cr3t-key/x?token=abc"));
        org.junit.jupiter.api.Assertions.assertEquals("https://push.example:8443/hook/…?…", shown);
        org.junit.jupiter.api.Assertions.assertEquals("http://127.0.0.1:9/hook", WebhookChannel.shown(java.net.URI.create("http://127.0.0.1:9/hook")));
    }
}
