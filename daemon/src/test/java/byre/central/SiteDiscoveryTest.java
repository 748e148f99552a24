package byre.central;

import static org.awaitility.Awaitility.await;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import byre.admin.LiveValues;
import byre.config.ByreConfig;
import byre.daemon.Daemon;
import byre.mqtt.EmbeddedBroker;
import byre.page.BarnPage;
import byre.testing.ConfigYaml;
import byre.testing.MutableClock;
import byre.testing.TestPublisher;
import byre.units.Quantity;
import byre.zones.ClimateDeriver;
import io.micrometer.core.instrument.simple.SimpleMeterRegistry;
import java.net.URI;
import java.net.http.HttpClient;
import java.net.http.HttpRequest;
import java.net.http.HttpResponse;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Duration;
import java.time.Instant;
import java.util.concurrent.TimeUnit;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.Timeout;
import org.junit.jupiter.api.io.TempDir;

/**
 * {@code central.discover}: a central byre on the embedded broker takes in a site it was never told of once that site
 * publishes its status, with the zones and groups of {@code central.defaults}: its values, its watches (a group
 * watch and "site offline"), its place on the page, and after a restart it starts with it. Topics that cannot be a
 * site's, and this byre's own status, are not taken.
 */
class SiteDiscoveryTest {
    static final Instant NOW = Instant.parse("2026-07-14T13:05:00Z");

    @TempDir
    Path dir;

    ByreConfig config(int brokerPort, int pagePort) throws Exception {
        return ConfigYaml.centre().embeddedBroker(brokerPort).discover("zones: [cow-shed], groups: [dairy], max-age: 5m")
                .site("larkmoor", "zones: [calf-barn]").rules("rules").page(pagePort).parse("central.yaml", dir);
    }

    @Test
    @Timeout(90)
    void aSiteThatPublishesItsStatusJoinsWithTheDefaultsAndStaysAfterARestart() throws Exception {
        Files.createDirectories(dir.resolve("rules"));
        Files.writeString(dir.resolve("rules/sites.rules"), ConfigYaml.SITE_DOWN + """
                watch dairy-hot
                  raise when @dairy.thi > 90
                  clear when @dairy.thi < 85
                  notify office
                """);
        int brokerPort = EmbeddedBroker.freePort("127.0.0.1");
        ByreConfig cfg = config(brokerPort, EmbeddedBroker.freePort("127.0.0.1"));
        MutableClock clock = new MutableClock(NOW);
        SimpleMeterRegistry registry = new SimpleMeterRegistry();
        LiveValues live = new LiveValues();
        String thi = "{\"value\":95.5,\"at\":\"" + NOW.minusSeconds(30) + "\"}";

        try (Daemon hub = Daemon.create(cfg, clock, registry).listen(live).start(new ClimateDeriver());
             BarnPage page = BarnPage.start(cfg, hub, live, registry, clock).orElseThrow();
             TestPublisher bridges = new TestPublisher("tcp://127.0.0.1:" + brokerPort)) {
            CentralConsumer central = hub.central();
            await().atMost(15, TimeUnit.SECONDS).until(() -> hub.link().isConnected());
            // Before its status, a site's values are nobody's; what cannot be a site id, and this byre itself, never join.
            bridges.publish("byre/fellside/zones/cow-shed/thi", thi);
            bridges.publish("byre/fell side/status", "online", 1, true);
            bridges.publish("byre/hub/status", "online", 1, true);
            await().atMost(15, TimeUnit.SECONDS).until(() -> registry.counter("byre.central.sites.found", "result", "refused").count() == 1.0);
            assertEquals(java.util.List.of("larkmoor"), central.siteIds());

            bridges.publish("byre/fellside/status", "online", 1, true);
            await().atMost(15, TimeUnit.SECONDS).until(() -> central.siteIds().contains("fellside"));
            assertEquals(java.util.List.of("fellside/cow-shed"), central.zones("fellside").stream().map(z -> z.id()).toList());
            assertEquals(1.0, registry.counter("byre.central.sites.found", "result", "joined").count());
            // The rules are compiled again with its zones (at the pipeline's next turn of time); then its values reach
            // the group watch.
            clock.advance(Duration.ofSeconds(1));
            await().atMost(15, TimeUnit.SECONDS).until(() -> hub.ruleReloads(true) >= 1);
            bridges.publish("byre/fellside/zones/cow-shed/thi", thi);
            await().atMost(15, TimeUnit.SECONDS).until(() -> hub.zones().latest("fellside/cow-shed", Quantity.THI) == 95.5);
            await().atMost(15, TimeUnit.SECONDS).until(() -> open(hub, "dairy-hot", "fellside/cow-shed"));
            bridges.publish("byre/fellside/status", "offline", 1, true);
            await().atMost(15, TimeUnit.SECONDS).until(() -> open(hub, "site-down", "fellside"));
            assertFalse(open(hub, "site-down", "larkmoor"), "the listed site has said nothing: not known to be offline");

            HttpResponse<String> list = HttpClient.newHttpClient().send(HttpRequest.newBuilder(
                    URI.create("http://127.0.0.1:" + page.port() + "/")).build(), HttpResponse.BodyHandlers.ofString());
            assertTrue(list.body().contains("data-site=\"fellside\""), list.body());
            assertTrue(list.body().contains("data-state=\"offline\">offline</span>"), list.body());
            assertTrue(list.body().contains("<span class=\"kv\">95.5</span>"), list.body());
        }

        // Restarted, the centre knows the site before it says anything; so do the commands beside it.
        int again = EmbeddedBroker.freePort("127.0.0.1");
        ByreConfig restarted = config(again, EmbeddedBroker.freePort("127.0.0.1"));
        try (Daemon hub = Daemon.create(restarted, clock, new SimpleMeterRegistry()).start(new ClimateDeriver())) {
            assertEquals(java.util.List.of("larkmoor", "fellside"), hub.central().siteIds());
            assertTrue(hub.watches().openCount(byre.rules.eval.AlertState.RAISED) >= 1, "its alert carried over");
        }
        ByreConfig forCommands = FoundSites.readStored(restarted);
        assertTrue(forCommands.zones().containsKey("fellside/cow-shed") && forCommands.central().isSiteZone("fellside"));
    }

    static boolean open(Daemon d, String watch, String zone) {
        return d.alerts().book().openIncidents().stream().anyMatch(i -> i.watch().equals(watch) && zone.equals(i.zone()));
    }
}
