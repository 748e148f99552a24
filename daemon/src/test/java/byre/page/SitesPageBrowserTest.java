package byre.page;

import static org.awaitility.Awaitility.await;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import byre.admin.LiveValues;
import byre.alerts.AlertEvent;
import byre.alerts.EventKind;
import byre.config.ByreConfig;
import byre.daemon.Daemon;
import byre.mqtt.EmbeddedBroker;
import byre.testing.Chromium;
import byre.testing.ConfigYaml;
import byre.testing.MutableClock;
import byre.testing.TestPublisher;
import byre.units.Quantity;
import byre.zones.ClimateDeriver;
import io.micrometer.core.instrument.simple.SimpleMeterRegistry;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Duration;
import java.time.Instant;
import java.util.Arrays;
import java.util.List;
import org.junit.jupiter.api.Assumptions;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.Timeout;
import org.junit.jupiter.api.io.TempDir;

/**
 * A central byre's page in a real browser at a phone's width: three Larkmoor-area sites imitated on the centre's
 * (embedded) broker as their bridges would deliver them (status, zone streams, an alert event), the list of sites
 * worst first, and one site's page reached by tapping its name. Screenshots land in {@code daemon/target/barn-page/}.
 */
class SitesPageBrowserTest {
    /** 13:05 UTC is 14:05 in London (summer time): day. */
    static final Instant NOW = Instant.parse("2026-07-14T13:05:00Z");

    @TempDir
    Path dir;

    static String zoneValue(double value, Instant at) {
        return "{\"value\":" + value + ",\"at\":\"" + at + "\"}";
    }

    @Test
    @Timeout(120)
    void aPhoneSeesEverySiteWorstFirstAndOpensOne() throws Exception {
        Assumptions.assumeTrue(Chromium.installed(),
                "Debian's chromium and chromium-driver are not installed (/usr/bin/chromium, /usr/bin/chromedriver); skipping the browser test");
        int brokerPort = EmbeddedBroker.freePort("127.0.0.1");
        int pagePort = EmbeddedBroker.freePort("127.0.0.1");
        Files.createDirectories(dir.resolve("rules"));
        Files.writeString(dir.resolve("rules/sites.rules"), ConfigYaml.SITE_DOWN);
        ByreConfig cfg = ConfigYaml.centre().timezone("Europe/London").embeddedBroker(brokerPort)
                .site("larkmoor", "zones: [calf-barn, cow-shed], groups: [dairy]")
                .site("brackenhill", "zones: [cow-shed], groups: [dairy]")
                .site("fellside", "zones: [cow-shed]").rules("rules").page(pagePort).parse("central.yaml", dir);
        Instant fresh = NOW.minus(Duration.ofMinutes(1));
        Instant old = NOW.minus(Duration.ofMinutes(125));
        MutableClock clock = new MutableClock(old);
        LiveValues live = new LiveValues();
        SimpleMeterRegistry registry = new SimpleMeterRegistry();

        try (Daemon hub = Daemon.create(cfg, clock, registry).listen(live).start(new ClimateDeriver());
             BarnPage page = BarnPage.start(cfg, hub, live, registry, clock).orElseThrow()) {
            await().atMost(Duration.ofSeconds(15)).until(() -> hub.link().isConnected());
            try (TestPublisher bridges = new TestPublisher("tcp://127.0.0.1:" + brokerPort)) {
                // Brackenhill's last words, 2 h 5 min ago; then the others, now.
                bridges.publish("byre/brackenhill/zones/cow-shed/thi", zoneValue(70.2, old), 1, true);
                bridges.publish("byre/brackenhill/status", "offline", 1, true);
                await().atMost(Duration.ofSeconds(15)).until(() -> live.get("brackenhill/cow-shed", Quantity.THI) != null
                        && hub.alerts().book().openIncidents().size() == 1);
                clock.set(NOW);
                bridges.publish("byre/larkmoor/status", "online", 1, true);
                bridges.publish("byre/larkmoor/zones/cow-shed/thi", zoneValue(81.4, fresh), 1, true);
                bridges.publish("byre/larkmoor/zones/cow-shed/dry-bulb", zoneValue(30.0, fresh), 1, true);
                bridges.publish("byre/larkmoor/zones/calf-barn/dry-bulb", zoneValue(12.5, fresh), 1, true);
                bridges.publish("byre/larkmoor/events", new AlertEvent("e1", "k7m2xq9rtb", EventKind.RAISED, "larkmoor", "heat-stress",
                        "cow-shed", "warning", "thi", 81.4, "", NOW.minus(Duration.ofMinutes(42)), NOW.minus(Duration.ofMinutes(40)),
                        "Heat stress in cow-shed: THI 81.4. Check fans & water.", null, List.of(), List.of()).toJson());
                bridges.publish("byre/fellside/status", "online", 1, true);
                bridges.publish("byre/fellside/zones/cow-shed/thi", zoneValue(68.0, fresh), 1, true);
            }
            await().atMost(Duration.ofSeconds(15)).until(() -> hub.central().events().openIncidents().size() == 1
                    && hub.alerts().book().openIncidents().size() == 1 && live.get("fellside/cow-shed", Quantity.THI) != null);
            hub.flush();

            Path scratch = Files.createDirectories(dir.resolve("browser"));
            try (Chromium phone = Chromium.start(scratch, BarnPageBrowserTest.PHONE_WIDTH, 780)) {
                String base = "http://127.0.0.1:" + page.port();
                phone.open(base + "/");
                List<String> cards = phone.all("#sites article[data-site]");
                List<String> order = new java.util.ArrayList<>();
                for (String c : cards) order.add(phone.attribute(c, "data-site"));
                // The offline site has the centre's critical "site-down", larkmoor its own warning, fellside nothing.
                assertEquals(List.of("brackenhill", "larkmoor", "fellside"), order);
                assertTrue(phone.text(phone.one("#sites h2")).contains("Sites (3) · 2 with open alerts · 1 offline"), phone.text(phone.one("#sites h2")));
                String bracken = phone.text(phone.one("[data-site='brackenhill']"));
                assertTrue(bracken.contains("offline") && bracken.contains("last message 2 h 5 min ago") && bracken.contains("CRITICAL")
                        && bracken.contains("site-down") && bracken.contains("open 2 h 5 min"), bracken);
                String lark = phone.text(phone.one("[data-site='larkmoor']"));
                assertTrue(lark.contains("WARNING") && lark.contains("heat-stress in cow-shed") && lark.contains("not acknowledged"), lark);
                assertTrue(lark.contains("online") && lark.contains("last message 0 s ago"), lark);
                assertEquals("81.4", phone.text(phone.one("[data-site='larkmoor'] [data-zone='larkmoor/cow-shed'] [data-q='thi'] .kv")));
                assertEquals("danger", phone.text(phone.one("[data-site='larkmoor'] [data-zone='larkmoor/cow-shed'] .band")));
                assertEquals("30.0 °C", phone.text(phone.one("[data-site='larkmoor'] [data-zone='larkmoor/cow-shed'] [data-q='dry-bulb'] .kv")));
                assertEquals("70.2", phone.text(phone.one("[data-site='brackenhill'] [data-q='thi'] .kv")), "an offline site's last value");
                assertEquals("0.6", phone.css(phone.one("[data-site='brackenhill'] [data-q='thi']"), "opacity"), "dimmed: stale");
                // Readable on a 360-px screen: nothing wider than the screen, every card inside it.
                assertEquals(String.valueOf(BarnPageBrowserTest.PHONE_WIDTH), phone.property(phone.one("html"), "clientWidth"));
                assertTrue(Integer.parseInt(phone.property(phone.one("html"), "scrollWidth")) <= BarnPageBrowserTest.PHONE_WIDTH, "no sideways scrolling");
                for (String c : cards) {
                    double[] r = phone.rect(c);
                    assertTrue(r[0] >= 0 && r[0] + r[2] <= BarnPageBrowserTest.PHONE_WIDTH, "card inside the screen: " + Arrays.toString(r));
                }
                phone.screenshot(BarnPageBrowserTest.SHOTS.resolve("sites-360.png"));

                // Tapping a site's name opens its page: the barn page's zone layout and its open alert, and the way back.
                phone.click(phone.one("[data-site='larkmoor'] h2 a"));
                assertTrue(phone.currentUrl().endsWith("/site/larkmoor"), phone.currentUrl());
                assertEquals("cow-shed", phone.text(phone.one("[data-zone='larkmoor/cow-shed'] h2 span")), "named within its site");
                assertEquals("81.4", phone.text(phone.one("[data-zone='larkmoor/cow-shed'] .thi .big")));
                assertEquals("12.5 °C", phone.text(phone.one("[data-zone='larkmoor/calf-barn'] [data-q='dry-bulb'] dd")));
                String alert = phone.text(phone.one("#alerts article[data-incident='k7m2xq9rtb']"));
                assertTrue(alert.contains("heat-stress in cow-shed") && alert.contains("Check fans & water.") && alert.contains("Not acknowledged"), alert);
                assertTrue(Integer.parseInt(phone.property(phone.one("html"), "scrollWidth")) <= BarnPageBrowserTest.PHONE_WIDTH, "no sideways scrolling");
                phone.screenshot(BarnPageBrowserTest.SHOTS.resolve("site-360.png"));
                phone.click(phone.one("#all-sites"));
                assertTrue(phone.currentUrl().endsWith("/"), phone.currentUrl());
            }
        }
    }
}
