package byre.page;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertTrue;

import byre.admin.LiveValues;
import byre.alerts.AckResult;
import byre.alerts.AlertPolicy;
import byre.alerts.IdSource;
import byre.alerts.IncidentBook;
import byre.alerts.OpenIncident;
import byre.alerts.WatchOutcome;
import byre.config.ByreConfig;
import byre.config.Secret;
import byre.history.HistoryStore;
import byre.rules.ZoneReading;
import byre.testing.Configs;
import byre.testing.MutableClock;
import byre.units.Quantity;
import io.micrometer.core.instrument.simple.SimpleMeterRegistry;
import java.net.URI;
import java.net.http.HttpClient;
import java.net.http.HttpRequest;
import java.net.http.HttpResponse;
import java.nio.charset.StandardCharsets;
import java.nio.file.Path;
import java.time.Duration;
import java.time.Instant;
import java.util.ArrayList;
import java.util.Base64;
import java.util.HexFormat;
import java.util.List;
import org.junit.jupiter.api.AfterEach;
import org.junit.jupiter.api.BeforeEach;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/**
 * The page's listener over real HTTP (JDK client, 127.0.0.1) with a real incident book and SQLite history: what a
 * GET may and may not do, what a signed link's POST does once, the token's place, and the headers every page carries.
 */
class PageServerTest {
    static final Instant NOW = Instant.parse("2026-07-14T02:05:00Z");
    static final String TOKEN = "larkmoor-admin-token-7f3a";

    @TempDir
    Path dir;

    final MutableClock clock = new MutableClock(NOW);
    final IncidentBook book = new IncidentBook("larkmoor", IdSource.counting());
    final List<AckResult> acks = new ArrayList<>();
    final HttpClient http = HttpClient.newHttpClient();
    final SimpleMeterRegistry registry = new SimpleMeterRegistry();
    HistoryStore store;
    AckLinkSigner signer;
    PageServer server;
    String incident;

    void start(boolean readingNeedsToken) throws Exception {
        ByreConfig cfg = Configs.parse("byre.yaml", """
                site: larkmoor
                timezone: Europe/London
                sensors:
                  shed-dry: { topic: larkmoor/cow-shed/dry, quantity: dry-bulb, unit: C }
                zones:
                  cow-shed: { sensors: [shed-dry] }
                history:
                  path: history.db
                """, dir, n -> null);
        store = HistoryStore.open(dir.resolve("history.db"), clock);
        LiveValues live = new LiveValues();
        live.accept(new ZoneReading(NOW.minusSeconds(30), "cow-shed", Quantity.DRY_BULB, 29.5));
        book.accept(new WatchOutcome(WatchOutcome.Kind.RAISED, "heat-stress", "cow-shed", "warning", "thi", 80.1, "",
                NOW.minus(Duration.ofMinutes(42)), NOW.minus(Duration.ofMinutes(40)), "Heat stress in cow-shed: THI 80.1",
                new AlertPolicy(List.of("night-phone"), null, null, List.of())));
        incident = book.openIncidents().get(0).id();
        signer = new AckLinkSigner(HexFormat.of().parseHex("42".repeat(32)), "http://127.0.0.1", Duration.ofHours(12), clock);
        BarnPageSource source = new BarnPageSource(cfg, live, store::openReader, book::openIncidents);
        BarnPageHtml.Site site = new BarnPageHtml.Site("larkmoor", cfg.timezone(), false);
        server = PageServer.start("127.0.0.1", 0, site, PageContent.barn(site, source, book::openIncidents),
                (id, by) -> {
                    AckResult r = book.acknowledge(id, by, clock.instant());
                    acks.add(r);
                    return r;
                }, signer, new Secret(TOKEN + "\n", "test"), readingNeedsToken, clock, registry);
    }

    @BeforeEach
    void open() throws Exception {
        start(false);
    }

    @AfterEach
    void stop() {
        server.close();
        store.close();
    }

    String url(String path) {
        return "http://127.0.0.1:" + server.port() + path;
    }

    String linkPath() {
        String link = signer.link(incident, NOW);
        return link.substring("http://127.0.0.1".length());
    }

    HttpResponse<String> get(String path, String... headers) throws Exception {
        HttpRequest.Builder b = HttpRequest.newBuilder(URI.create(url(path))).GET();
        if (headers.length > 0) b.headers(headers);
        return http.send(b.build(), HttpResponse.BodyHandlers.ofString());
    }

    HttpResponse<String> post(String path, String form) throws Exception {
        return http.send(HttpRequest.newBuilder(URI.create(url(path))).header("Content-Type", "application/x-www-form-urlencoded")
                .POST(HttpRequest.BodyPublishers.ofString(form)).build(), HttpResponse.BodyHandlers.ofString());
    }

    OpenIncident open(String id) {
        return book.openIncidents().stream().filter(i -> i.id().equals(id)).findFirst().orElseThrow();
    }

    @Test
    void theBarnPageIsOpenAndCarriesItsGuards() throws Exception {
        HttpResponse<String> r = get("/");
        assertEquals(200, r.statusCode());
        assertEquals("text/html; charset=utf-8", r.headers().firstValue("Content-Type").orElse(""));
        assertEquals(PageServer.CSP, r.headers().firstValue("Content-Security-Policy").orElse(""));
        assertEquals("no-referrer", r.headers().firstValue("Referrer-Policy").orElse(""), "a link's address never leaks onward");
        assertEquals("no-store", r.headers().firstValue("Cache-Control").orElse(""));
        assertTrue(r.body().contains("<dd>29.5\u00a0°C</dd>"), "the daemon's live value");
        assertTrue(r.body().contains("data-incident=\"" + incident + "\""));
        assertTrue(r.body().contains("shed-dry</strong> (cow-shed): never reported"), "the empty history knows no sensor reading");
        assertFalse(r.body().contains(TOKEN));
        assertEquals(405, http.send(HttpRequest.newBuilder(URI.create(url("/"))).DELETE().build(), HttpResponse.BodyHandlers.ofString()).statusCode());
        assertEquals(404, get("/metrics").statusCode(), "the admin API is not on this listener");
    }

    @Test
    void openingALinkNeverAcknowledges() throws Exception {
        for (int i = 0; i < 3; i++) {
            HttpResponse<String> r = get(linkPath());
            assertEquals(200, r.statusCode());
            assertTrue(r.body().contains("<form method=\"post\" action=\"" + linkPath() + "\">"), r.body());
            assertFalse(r.body().contains("http-equiv=\"refresh\""), "the confirmation page does not reload itself");
        }
        assertNull(open(incident).ackBy());
        assertTrue(acks.isEmpty());
        assertEquals(200, http.send(HttpRequest.newBuilder(URI.create(url(linkPath()))).method("HEAD", HttpRequest.BodyPublishers.noBody()).build(),
                HttpResponse.BodyHandlers.ofString()).statusCode());
        assertNull(open(incident).ackBy());
    }

    @Test
    void pressingTheButtonAcknowledgesOnce() throws Exception {
        HttpResponse<String> r = post(linkPath(), "");
        assertEquals(200, r.statusCode());
        assertTrue(r.body().contains("Acknowledged: heat-stress in cow-shed, open 42 min."), r.body());
        assertEquals(PageServer.LINK_ACK_BY, open(incident).ackBy());
        HttpResponse<String> again = post(linkPath(), "");
        assertEquals(409, again.statusCode());
        assertTrue(again.body().contains("This link has been used"));
        assertEquals(1, acks.size(), "the second press reached nothing");
        assertEquals(AckResult.Status.ACKNOWLEDGED, acks.get(0).status());
    }

    @Test
    void forgedExpiredAndOtherIncidentsLinksChangeNothing() throws Exception {
        String good = linkPath();
        String forged = good.substring(0, good.length() - 2) + (good.endsWith("AA") ? "BB" : "AA");
        HttpResponse<String> r = post(forged, "");
        assertEquals(403, r.statusCode());
        assertTrue(r.body().contains("This link is not valid"));
        assertEquals(403, post(good.replace("/a/" + incident + "/", "/a/i2/"), "").statusCode(), "for another incident");
        assertEquals(403, post("/a/" + incident, "").statusCode(), "cut short");
        String old = signer.link(incident, NOW.minus(Duration.ofHours(13))).substring("http://127.0.0.1".length());
        HttpResponse<String> expired = post(old, "");
        assertEquals(410, expired.statusCode());
        assertTrue(expired.body().contains("It worked until Tue 14 Jul 02:05 farm time."), expired.body());
        assertTrue(acks.isEmpty());
        assertNull(open(incident).ackBy());
        assertEquals(3.0, registry.counter("byre.page.acks", "via", "link", "outcome", "forged").count(), 0.0);
        assertEquals(1.0, registry.counter("byre.page.acks", "via", "link", "outcome", "expired").count(), 0.0);
    }

    @Test
    void aLinkForAnAlertThatClearedSaysSo() throws Exception {
        String path = linkPath();
        book.accept(new WatchOutcome(WatchOutcome.Kind.CLEARED, "heat-stress", "cow-shed", "warning", "thi", 70.0, "",
                NOW.minus(Duration.ofMinutes(42)), NOW, "", new AlertPolicy(List.of("night-phone"), null, null, List.of())));
        HttpResponse<String> r = get(path);
        assertEquals(404, r.statusCode());
        assertTrue(r.body().contains("This alert is no longer open: it has cleared. Nothing was changed."), r.body());
    }

    @Test
    void theTokenAcknowledgesFromThePageAndAWrongOneDoesNot() throws Exception {
        HttpResponse<String> form = get("/ack/" + incident);
        assertEquals(200, form.statusCode());
        assertTrue(form.body().contains("name=\"token\" type=\"password\""));
        HttpResponse<String> wrong = post("/ack/" + incident, "token=guess&by=Sam");
        assertEquals(403, wrong.statusCode());
        assertNull(open(incident).ackBy());
        HttpResponse<String> ok = post("/ack/" + incident, "token=" + TOKEN + "&by=%3Cb%3ESam%3C%2Fb%3E");
        assertEquals(200, ok.statusCode());
        assertEquals("<b>Sam</b>", open(incident).ackBy());
        assertTrue(get("/").body().contains("Acknowledged by &lt;b&gt;Sam&lt;/b&gt;"), "the name is escaped on the page");
        HttpResponse<String> again = get("/ack/" + incident);
        assertTrue(again.body().contains("Already acknowledged") && !again.body().contains("name=\"token\""), again.body());
        assertEquals(404, get("/ack/" + "nope%3Cx").statusCode());
    }

    @Test
    void readingCanBeBehindTheToken() throws Exception {
        server.close();
        store.close();
        start(true);
        HttpResponse<String> r = get("/");
        assertEquals(401, r.statusCode());
        assertTrue(r.headers().firstValue("WWW-Authenticate").orElse("").startsWith("Basic realm=\"byre barn page\""));
        String basic = "Basic " + Base64.getEncoder().encodeToString(("sam:" + TOKEN).getBytes(StandardCharsets.UTF_8));
        assertEquals(200, get("/", "Authorization", basic).statusCode());
        String wrong = "Basic " + Base64.getEncoder().encodeToString("sam:guess".getBytes(StandardCharsets.UTF_8));
        assertEquals(401, get("/", "Authorization", wrong).statusCode());
        assertEquals(200, get(linkPath()).statusCode(), "a signed link is its own authority");
        assertFalse(get("/ack/" + incident, "Authorization", basic).body().contains("name=\"token\""), "logged in: no token field");
    }
}
