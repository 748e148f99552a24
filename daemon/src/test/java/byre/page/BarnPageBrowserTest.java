package byre.page;

import static org.awaitility.Awaitility.await;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertTrue;

import byre.admin.LiveValues;
import byre.alerts.OpenIncident;
import byre.config.ByreConfig;
import byre.daemon.Daemon;
import byre.history.HistoryStore;
import byre.history.HistoryWriter;
import byre.history.Retention;
import byre.history.StreamKey;
import byre.mqtt.EmbeddedBroker;
import byre.testing.Chromium;
import byre.testing.Configs;
import byre.testing.MutableClock;
import byre.testing.TestPublisher;
import byre.units.Quantity;
import byre.zones.ClimateDeriver;
import io.micrometer.core.instrument.simple.SimpleMeterRegistry;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Clock;
import java.time.Duration;
import java.time.Instant;
import java.time.ZoneOffset;
import java.util.Arrays;
import java.util.List;
import org.junit.jupiter.api.Assumptions;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.Timeout;
import org.junit.jupiter.api.io.TempDir;

/**
 * The barn page in a real browser: a running daemon (in this JVM, on the embedded broker, with a real SQLite history
 * holding a day of readings) serves the page to Debian's headless Chromium at a phone's width. The test reads what
 * the phone shows (zones, values, band, open alerts, silent sensors, farm time), saves a screenshot under
 * {@code daemon/target/barn-page/}, and acknowledges one alert through its signed link's button and the other with
 * the admin token on the page.
 */
class BarnPageBrowserTest {
    /** 02:05 UTC is 03:05 in London (summer time): night on the farm, so the page is dark. */
    static final Instant NOW = Instant.parse("2026-07-14T02:05:00Z");
    static final String TOKEN = "larkmoor-admin-token-7f3a";
    static final Path SHOTS = Path.of("target", "barn-page");
    static final int PHONE_WIDTH = 360;

    @TempDir
    Path dir;

    static String config(Path dir, int brokerPort, int pagePort) {
        return """
                site: larkmoor
                timezone: Europe/London
                units: metric
                mqtt:
                  broker: embedded
                  listen: 127.0.0.1:%d
                  client-id: byre-page-test
                sensors:
                  pen1-dry: { topic: larkmoor/calf-barn/pen1/dry, quantity: dry-bulb, unit: C }
                  pen1-wet: { topic: larkmoor/calf-barn/pen1/wet, quantity: wet-bulb, unit: C }
                  pen1-air: { topic: larkmoor/calf-barn/pen1/air, quantity: air-speed, unit: m/s }
                  shed-dry: { topic: larkmoor/cow-shed/dry, quantity: dry-bulb, unit: C }
                  shed-rh:  { topic: larkmoor/cow-shed/rh, quantity: rh, unit: "%%" }
                zones:
                  calf-pen-1: { groups: [calves], sensors: [pen1-dry, pen1-wet, pen1-air], elevation: 180 m, max-age: 5m }
                  cow-shed:   { groups: [cows], sensors: [shed-dry, shed-rh], elevation: 180 m, max-age: 5m }
                rules: rules
                history:
                  path: %s
                admin:
                  listen: 127.0.0.1:0
                  token-file: admin.token
                page:
                  listen: 127.0.0.1:%d
                  base-url: http://127.0.0.1:%d
                  link-valid: 12h
                """.formatted(brokerPort, dir.resolve("history.db"), pagePort, pagePort);
    }

    static final String RULES = """
            # Test watches for the Larkmoor cow shed and calf pen (thresholds for the test only).
            watch heat-stress
              raise when cow-shed.thi >= 78
              level warning
              message "Heat stress in {zone}: THI {value}. Check fans & water <now>."
            watch calf-cold
              raise when calf-pen-1.dry-bulb < 8 C
              level critical
              message "Calves cold in {zone}: {value} {unit}. Check bedding and jackets."
            """;

    /** A day of 5-minute zone readings (a warm afternoon in the shed, a cold night in the pen) and recent sensor rows. */
    static void writeHistory(Path db) {
        Clock at = Clock.fixed(NOW, ZoneOffset.UTC);
        try (HistoryStore store = HistoryStore.open(db, at)) {
            HistoryWriter w = HistoryWriter.start(store, new Retention(Duration.ofDays(14), Duration.ofDays(90), Duration.ofDays(1825)), at);
            Instant start = NOW.minus(Duration.ofHours(24));
            for (int i = 0; i < 24 * 12; i++) {
                Instant t = start.plus(Duration.ofMinutes(5L * i));
                double day = Math.sin((i - 60) / 288.0 * 2 * Math.PI); // warmest about 15:00 UTC
                w.append(StreamKey.zone("cow-shed", Quantity.THI), t, 74 + 7 * day);
                w.append(StreamKey.zone("cow-shed", Quantity.DRY_BULB), t, 24 + 6 * day);
                w.append(StreamKey.zone("calf-pen-1", Quantity.THI), t, 52 + 8 * day);
                w.append(StreamKey.zone("calf-pen-1", Quantity.DRY_BULB), t, 10 + 6 * day);
            }
            w.flush();
            w.close();
        }
    }

    @Test
    @Timeout(120)
    void aPhoneSeesTheBarnAndAcknowledgesWithOneTapAndWithTheToken() throws Exception {
        Assumptions.assumeTrue(Chromium.installed(),
                "Debian's chromium and chromium-driver are not installed (/usr/bin/chromium, /usr/bin/chromedriver); skipping the browser test");
        Files.writeString(dir.resolve("admin.token"), TOKEN + "\n");
        Files.createDirectories(dir.resolve("rules"));
        Files.writeString(dir.resolve("rules/test.rules"), RULES);
        writeHistory(dir.resolve("history.db"));
        int brokerPort = EmbeddedBroker.freePort("127.0.0.1");
        int pagePort = EmbeddedBroker.freePort("127.0.0.1");
        Path cfgFile = dir.resolve("byre.yaml");
        Files.writeString(cfgFile, config(dir, brokerPort, pagePort));
        ByreConfig cfg = Configs.load(cfgFile);
        MutableClock clock = new MutableClock(NOW);
        LiveValues live = new LiveValues();
        SimpleMeterRegistry registry = new SimpleMeterRegistry();

        try (Daemon daemon = Daemon.create(cfg, clock, registry).listen(live).start(new ClimateDeriver());
             BarnPage page = BarnPage.start(cfg, daemon, live, registry, clock).orElseThrow()) {
            List<byre.alerts.AlertEvent> events = new java.util.concurrent.CopyOnWriteArrayList<>();
            daemon.alerts().onEvent(events::add);
            await().atMost(Duration.ofSeconds(15)).until(() -> daemon.link().isConnected());
            try (TestPublisher sensors = new TestPublisher("tcp://127.0.0.1:" + brokerPort)) {
                sensors.publish("larkmoor/cow-shed/dry", "30");
                sensors.publish("larkmoor/cow-shed/rh", "70");
                sensors.publish("larkmoor/calf-barn/pen1/dry", "3");
                sensors.publish("larkmoor/calf-barn/pen1/wet", "2");
            }
            // The zone derives again (THI from the new pair) once its minimum interval has passed on the injected clock.
            await().atMost(Duration.ofSeconds(15)).until(() -> daemon.processed() >= 4);
            clock.advance(Duration.ofSeconds(5));
            await().atMost(Duration.ofSeconds(15)).until(() -> daemon.alerts().book().openIncidents().size() == 2);
            daemon.flush();
            OpenIncident heat = incident(daemon, "heat-stress");
            OpenIncident cold = incident(daemon, "calf-cold");

            phase("daemon up, alerts raised");
            Path scratch = Files.createDirectories(dir.resolve("browser"));
            try (Chromium phone = Chromium.start(scratch, PHONE_WIDTH, 780)) {
                String base = "http://127.0.0.1:" + page.port();
                phase("browser started");
                phone.open(base + "/");

                // Farm time, and the dark scheme of the night.
                assertEquals("03:05", phone.text(phone.one("#farm-time")));
                assertEquals("night", phone.attribute(phone.one("html"), "class"));
                assertEquals("rgba(0, 0, 0, 1)", phone.css(phone.one("body"), "background-color"));

                // Alerts first, with their incident ids and "Not acknowledged"; the message's markup shown as text.
                List<String> alerts = phone.all("#alerts article.alert");
                assertEquals(2, alerts.size());
                assertTrue(phone.text(phone.one("#alerts h2")).contains("Open alerts (2)"));
                String heatCard = phone.text(phone.one("#alerts article[data-incident='" + heat.id() + "']"));
                assertTrue(heatCard.contains("heat-stress in cow-shed"), heatCard);
                assertTrue(heatCard.contains("incident " + heat.id()), heatCard);
                assertTrue(heatCard.contains("Not acknowledged"), heatCard);
                assertTrue(heatCard.contains("Check fans & water <now>."), "the message is escaped, shown as typed: " + heatCard);
                assertTrue(phone.all("#alerts now").isEmpty(), "no element came out of the message");
                String coldCard = phone.text(phone.one("#alerts article[data-incident='" + cold.id() + "']"));
                assertTrue(coldCard.contains("CRITICAL") && coldCard.contains("calf-cold in calf-pen-1") && coldCard.contains("Air 3.0 °C"), coldCard);
                double alertsTop = Double.parseDouble(phone.property(phone.one("#alerts"), "offsetTop"));
                double zonesTop = Double.parseDouble(phone.property(phone.one("#zones"), "offsetTop"));
                assertTrue(alertsTop < zonesTop, "alerts come before the zones");

                // Zones with their values in the site's (metric) units and the THI band in words.
                // THI of 30 C and 70 % RH by NRC 1971, THI = (1.8T + 32) - (0.55 - 0.0055 RH)(1.8T - 26) = 86 - 0.165 * 28 = 81.38
                // (computed by hand), which the Livestock Weather Safety Index calls "danger" (79-83).
                String shed = "[data-zone='cow-shed']";
                assertEquals("81.4", phone.text(phone.one(shed + " .thi .big")));
                assertEquals("danger", phone.text(phone.one(shed + " .thi .band")));
                assertEquals("30.0 °C", phone.text(phone.one(shed + " [data-q='dry-bulb'] dd")));
                assertEquals("70%", phone.text(phone.one(shed + " [data-q='rh'] dd")));
                String pen = "[data-zone='calf-pen-1']";
                assertEquals("3.0 °C", phone.text(phone.one(pen + " [data-q='dry-bulb'] dd")));
                assertEquals("normal", phone.text(phone.one(pen + " .thi .band")));
                assertTrue(phone.text(phone.one(pen + " h2")).contains("1 open alert"));
                // The 24-hour trends from the history's rollups.
                assertEquals(2, phone.all(shed + " figure[data-trend] svg path").size());
                assertTrue(phone.text(phone.one(shed + " figure[data-trend='thi'] figcaption")).startsWith("THI, last 24 h: "));
                // The sensor that never reported.
                assertEquals("pen1-air (calf-pen-1): never reported", phone.text(phone.one("#silent li[data-sensor='pen1-air']")));
                assertEquals(1, phone.all("#silent li").size());
                // Readable on a 360-px screen: nothing wider than the screen.
                assertEquals(String.valueOf(PHONE_WIDTH), phone.property(phone.one("html"), "clientWidth"));
                assertTrue(Integer.parseInt(phone.property(phone.one("html"), "scrollWidth")) <= PHONE_WIDTH, "no sideways scrolling");
                for (String card : alerts) {
                    double[] c = phone.rect(card);
                    for (String button : phone.all("#alerts article[data-incident] a.button")) {
                        double[] b = phone.rect(button);
                        if (b[1] < c[1] || b[1] > c[1] + c[3]) continue; // another card's button
                        assertTrue(b[0] + b[2] <= c[0] + c[2] - 4, "the button stays inside its card: " + Arrays.toString(b) + " in " + Arrays.toString(c));
                    }
                }
                phone.screenshot(SHOTS.resolve("barn-page-360.png"));
                phone.screenshotScreen(SHOTS.resolve("barn-page-360-first-screen.png"));
                phase("barn page read and screenshot");

                // One tap: the link in the raise message opens the alert and one button; opening it changes nothing.
                String text = events.stream().filter(e -> e.incident().equals(heat.id())).findFirst().orElseThrow().message();
                java.util.regex.Matcher m = java.util.regex.Pattern.compile(java.util.regex.Pattern.quote(base) + "/a/\\S+").matcher(text);
                assertTrue(m.find(), "the message carries the signed link: " + text);
                String link = m.group();
                assertTrue(link.startsWith(base + "/a/" + heat.id() + "/"), link);
                phone.open(link);
                phone.open(link); // a link preview and the tap itself: two fetches
                assertTrue(phone.text(phone.one("article.alert")).contains("heat-stress in cow-shed"));
                assertNull(incident(daemon, "heat-stress").ackBy(), "a GET never acknowledges");
                phone.screenshot(SHOTS.resolve("ack-link-360.png"));
                phone.click(phone.one("button#ack"));
                assertEquals("Acknowledged", phone.text(phone.one("#outcome")));
                assertEquals(PageServer.LINK_ACK_BY, incident(daemon, "heat-stress").ackBy());
                // The same link again: used; nothing changes.
                phone.open(link);
                assertEquals("This link has been used", phone.text(phone.one("#outcome")));
                // A forged link (signature altered) for the other alert: refused, nothing changes.
                String good = page.linkFor(cold.id()).orElseThrow();
                char mid = good.charAt(good.length() - 5);
                String forged = good.substring(0, good.length() - 5) + (mid == 'A' ? 'B' : 'A') + good.substring(good.length() - 4);
                phone.open(forged);
                assertEquals("This link is not valid", phone.text(phone.one("#outcome")));
                String expired = page.signer().orElseThrow().link(cold.id(), NOW.minus(Duration.ofHours(13)));
                phone.open(expired);
                assertEquals("This link has expired", phone.text(phone.one("#outcome")));
                assertNull(incident(daemon, "calf-cold").ackBy());
                phase("signed links");

                // With the admin token, from the barn page: a wrong token changes nothing, the right one acknowledges.
                phone.open(base + "/");
                phone.click(phone.one("#alerts article[data-incident='" + cold.id() + "'] a.button"));
                phone.type(phone.one("#token"), "guess");
                phone.click(phone.one("button#ack"));
                assertEquals("Wrong token", phone.text(phone.one("#outcome")));
                assertNull(incident(daemon, "calf-cold").ackBy());
                phone.open(base + "/ack/" + cold.id());
                phone.type(phone.one("#token"), TOKEN);
                phone.type(phone.one("#by"), "Sam");
                phone.click(phone.one("button#ack"));
                assertEquals("Acknowledged", phone.text(phone.one("#outcome")));
                assertEquals("Sam", incident(daemon, "calf-cold").ackBy());
                for (String[] c : new String[][] {{"link", "acknowledged"}, {"link", "used"}, {"link", "forged"}, {"link", "expired"},
                        {"token", "wrong-token"}, {"token", "acknowledged"}}) {
                    assertEquals(1.0, registry.counter("byre.page.acks", "via", c[0], "outcome", c[1]).count(), 0.0, String.join(" ", c));
                }

                phone.open(base + "/");
                assertTrue(phone.text(phone.one("#alerts article[data-incident='" + cold.id() + "']")).contains("Acknowledged by Sam"));
                assertTrue(phone.text(phone.one("#alerts article[data-incident='" + heat.id() + "']")).contains("Acknowledged by signed link"));
                assertFalse(phone.source().contains(TOKEN), "the token never comes back in a page");
                phase("token acknowledgement");
            }
        }
    }

    private long started = System.nanoTime();

    /** Prints how long each part took; the 120 s bound is generous because a busy shared build machine slows every part several times. */
    private void phase(String what) {
        long now = System.nanoTime();
        System.out.printf("barn page test: %-32s %5d ms%n", what, (now - started) / 1_000_000);
        started = now;
    }

    static OpenIncident incident(Daemon d, String watch) {
        return d.alerts().book().openIncidents().stream().filter(i -> i.watch().equals(watch)).findFirst()
                .orElseThrow(() -> new AssertionError("no open incident of " + watch));
    }
}
