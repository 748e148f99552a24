package byre.page;

import static org.awaitility.Awaitility.await;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import byre.admin.LiveValues;
import byre.config.ByreConfig;
import byre.daemon.Daemon;
import byre.json.Json;
import byre.mqtt.EmbeddedBroker;
import byre.testing.ConfigYaml;
import byre.testing.TestPublisher;
import byre.zones.ClimateDeriver;
import io.micrometer.core.instrument.simple.SimpleMeterRegistry;
import java.net.URI;
import java.net.http.HttpClient;
import java.net.http.HttpRequest;
import java.net.http.HttpResponse;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Clock;
import java.time.Duration;
import java.util.List;
import java.util.Map;
import java.util.concurrent.CopyOnWriteArrayList;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.Timeout;
import org.junit.jupiter.api.io.TempDir;

/**
 * The page of a central byre over real HTTP, with a barn's byre and the centre on one real broker (the barn's embedded
 * one, which the centre reaches as any client would): the list of sites, a site's page with the barn's open alert, and
 * an acknowledgement made on the centre's page, which is published to the barn's ack topic naming who acknowledged,
 * recorded by the barn, and shown at the centre once the barn reports it back.
 */
class CentralPageServerTest {
    static final String TOKEN = "hub-admin-token-5c21";

    @TempDir
    Path dir;

    final HttpClient http = HttpClient.newHttpClient();

    @Test
    @Timeout(90)
    void anAcknowledgementOnTheCentresPageGoesToTheSiteWhichRecordsWhoMadeIt() throws Exception {
        int brokerPort = EmbeddedBroker.freePort("127.0.0.1");
        int pagePort = EmbeddedBroker.freePort("127.0.0.1");
        Files.createDirectories(dir.resolve("barn-rules"));
        Files.writeString(dir.resolve("barn-rules/warm.rules"), "watch shed-warm\n  raise when cow-shed.dry-bulb > 30 C\n  clear when cow-shed.dry-bulb < 28 C\n  level warning\n  notify office\n");
        ByreConfig barnCfg = ConfigYaml.barn().embeddedBroker(brokerPort).acceptAcks()
                .sensor("shed-dry", "larkmoor/cow-shed/dry", "dry-bulb").zone("cow-shed", "shed-dry").parse("barn.yaml", dir);
        Files.createDirectories(dir.resolve("central-rules"));
        Files.writeString(dir.resolve("admin.token"), TOKEN + "\n");
        ByreConfig hubCfg = ConfigYaml.centre().timezone("Europe/London").broker(brokerPort)
                .site("larkmoor", "zones: [cow-shed], groups: [dairy]").site("brackenhill", "zones: [cow-shed]")
                .admin(0, "admin.token").page(pagePort).parse("central.yaml", dir);
        SimpleMeterRegistry registry = new SimpleMeterRegistry();
        LiveValues live = new LiveValues();

        try (Daemon barn = Daemon.create(barnCfg, Clock.systemUTC(), new SimpleMeterRegistry()).start(new ClimateDeriver());
             Daemon hub = Daemon.create(hubCfg, Clock.systemUTC(), registry).listen(live).start(new ClimateDeriver());
             BarnPage page = BarnPage.start(hubCfg, hub, live, registry, Clock.systemUTC()).orElseThrow();
             TestPublisher sensors = new TestPublisher("tcp://127.0.0.1:" + brokerPort)) {
            List<String> acks = new CopyOnWriteArrayList<>();
            sensors.client().subscribe("byre/+/ack", 1, (t, m) -> acks.add(t + " " + new String(m.getPayload(), StandardCharsets.UTF_8)));
            await().atMost(Duration.ofSeconds(20)).until(() -> Double.valueOf(1.0).equals(hub.central().links().online("larkmoor")));
            sensors.publish("larkmoor/cow-shed/dry", "31.5");
            await().atMost(Duration.ofSeconds(20)).until(() -> hub.central().events().openIncidents().size() == 1);
            String incident = hub.central().events().openIncidents().get(0).id();
            await().atMost(Duration.ofSeconds(20)).until(() -> live.get("larkmoor/cow-shed", byre.units.Quantity.DRY_BULB) != null);
            String base = "http://127.0.0.1:" + page.port();

            // The list: the barn with its open alert and its air temperature, the site never heard from after it.
            String list = get(base + "/").body();
            String card = SitesPageHtmlTest.card(list, "larkmoor");
            assertTrue(card.contains("shed-warm in <span class=\"nb\">cow-shed</span>"), card);
            assertTrue(card.contains("data-state=\"online\">online</span>"), card);
            assertTrue(card.contains("<span class=\"kv\">31.5\u00a0°C</span>"), card);
            assertEquals(List.of("larkmoor", "brackenhill"), SitesPageHtmlTest.order(list));
            assertTrue(SitesPageHtmlTest.card(list, "brackenhill").contains("no status yet"), list);

            // The site's page: its zone and its alert with the way to acknowledge it; an unknown site is not found.
            String site = get(base + "/site/larkmoor").body();
            assertTrue(site.contains("data-zone=\"larkmoor/cow-shed\"") && site.contains("data-incident=\"" + incident + "\""), site);
            assertTrue(site.contains("href=\"/ack/" + incident + "\""), site);
            assertEquals(404, get(base + "/site/nowhere").statusCode());

            // A wrong token sends nothing; the right one sends the name to the barn's ack topic.
            assertTrue(get(base + "/ack/" + incident).body().contains("name=\"token\""));
            assertEquals(403, post(base + "/ack/" + incident, "token=guess&by=Sam").statusCode());
            HttpResponse<String> ok = post(base + "/ack/" + incident, "token=" + TOKEN + "&by=Sam");
            assertEquals(200, ok.statusCode(), ok.body());
            assertTrue(ok.body().contains("Sent to larkmoor: its byre records who acknowledged"), ok.body());
            await().atMost(Duration.ofSeconds(20)).until(() -> !acks.isEmpty());
            String[] sent = acks.get(0).split(" ", 2);
            assertEquals("byre/larkmoor/ack", sent[0]);
            assertEquals(Map.of("incident", incident, "by", "Sam"), Json.parse(sent[1]));
            await().atMost(Duration.ofSeconds(20)).until(() -> barn.alerts().book().openIncidents().stream()
                    .anyMatch(i -> i.id().equals(incident) && "Sam".equals(i.ackBy())));

            // The barn reports it back: the centre's page shows who acknowledged, and a second try changes nothing.
            await().atMost(Duration.ofSeconds(20)).until(() -> get(base + "/site/larkmoor").body().contains("Acknowledged by Sam"));
            assertTrue(SitesPageHtmlTest.card(get(base + "/").body(), "larkmoor").contains("acknowledged by Sam"));
            HttpResponse<String> again = post(base + "/ack/" + incident, "token=" + TOKEN + "&by=Bob");
            assertFalse(again.body().contains("Sent to"), again.body());
            assertEquals(1, acks.size(), "one acknowledgement went out: " + acks);
            assertEquals(1.0, registry.counter("byre.page.acks", "via", "token", "outcome", "acknowledged").count(), 0.0);
            assertEquals(1.0, registry.counter("byre.page.acks", "via", "token", "outcome", "wrong-token").count(), 0.0);
        }
    }

    HttpResponse<String> get(String url) throws Exception {
        return http.send(HttpRequest.newBuilder(URI.create(url)).GET().build(), HttpResponse.BodyHandlers.ofString());
    }

    HttpResponse<String> post(String url, String form) throws Exception {
        return http.send(HttpRequest.newBuilder(URI.create(url)).header("Content-Type", "application/x-www-form-urlencoded")
                .POST(HttpRequest.BodyPublishers.ofString(form)).build(), HttpResponse.BodyHandlers.ofString());
    }
}
