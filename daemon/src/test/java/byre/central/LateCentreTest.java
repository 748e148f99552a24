package byre.central;

import static org.awaitility.Awaitility.await;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import byre.admin.AdminServer;
import byre.admin.HealthMonitor;
import byre.admin.LiveValues;
import byre.alerts.OpenIncident;
import byre.cli.Main;
import byre.config.ByreConfig;
import byre.daemon.Daemon;
import byre.mqtt.EmbeddedBroker;
import byre.page.BarnPage;
import byre.testing.ConfigYaml;
import byre.testing.Configs;
import byre.testing.TestPublisher;
import byre.zones.ClimateDeriver;
import io.micrometer.core.instrument.simple.SimpleMeterRegistry;
import java.io.ByteArrayOutputStream;
import java.io.PrintStream;
import java.net.URI;
import java.net.http.HttpClient;
import java.net.http.HttpRequest;
import java.net.http.HttpResponse;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Clock;
import java.time.Duration;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.Timeout;
import org.junit.jupiter.api.io.TempDir;

/**
 * A central byre started after a barn raised an alert, with a fresh history: the alert's events went out before the
 * centre ever subscribed, yet its page and {@code byre status --site} show the barn's open alert, learnt from the
 * barn's retained alert state; when the barn clears it, the centre shows it gone. On the barn's embedded broker.
 */
class LateCentreTest {
    @TempDir
    Path dir;

    @Test
    @Timeout(90)
    void aCentreStartedAfterTheBarnRaisedShowsTheOpenAlertUntilTheBarnClearsIt() throws Exception {
        int brokerPort = EmbeddedBroker.freePort("127.0.0.1");
        int pagePort = EmbeddedBroker.freePort("127.0.0.1");
        int adminPort = EmbeddedBroker.freePort("127.0.0.1");
        Files.createDirectories(dir.resolve("barn-rules"));
        Files.writeString(dir.resolve("barn-rules/cold.rules"), "watch calves-cold\n  raise when calf-barn.dry-bulb < 5 C\n"
                + "  clear when calf-barn.dry-bulb > 8 C\n  level critical\n  notify office\n");
        ByreConfig barnCfg = ConfigYaml.barn().embeddedBroker(brokerPort)
                .sensor("calf-dry", "larkmoor/calf-barn/dry", "dry-bulb").zone("calf-barn", "calf-dry").parse("barn.yaml", dir);
        Files.createDirectories(dir.resolve("central-rules"));
        Path hubFile = dir.resolve("central.yaml");
        Files.writeString(hubFile, ConfigYaml.centre().broker(brokerPort).site("larkmoor", "zones: [calf-barn]")
                .history(dir.resolve("central.db").toString()).admin(adminPort).page(pagePort).text());
        ByreConfig hubCfg = Configs.load(hubFile);

        try (Daemon barn = Daemon.create(barnCfg, Clock.systemUTC(), new SimpleMeterRegistry()).start(new ClimateDeriver());
             TestPublisher sensors = new TestPublisher("tcp://127.0.0.1:" + brokerPort)) {
            sensors.publish("larkmoor/calf-barn/dry", "2.5");
            await().atMost(Duration.ofSeconds(20)).until(() -> barn.alerts().book().openIncidents().size() == 1);
            String incident = barn.alerts().book().openIncidents().get(0).id();

            // Only now the centre starts, knowing nothing of the barn.
            SimpleMeterRegistry registry = new SimpleMeterRegistry();
            LiveValues live = new LiveValues();
            try (Daemon hub = Daemon.create(hubCfg, Clock.systemUTC(), registry).listen(live).start(new ClimateDeriver());
                 BarnPage page = BarnPage.start(hubCfg, hub, live, registry, Clock.systemUTC()).orElseThrow();
                 AdminServer admin = AdminServer.start("127.0.0.1", adminPort, hubCfg.admin().token(), () -> "",
                         new HealthMonitor(hub::health), live, Clock.systemUTC(), hubCfg.site())) {
                admin.setAlertSource(hub::openAlerts); // as byre run wires it: what byre status asks
                await().atMost(Duration.ofSeconds(20)).until(() -> hub.central().events().openIncidents().size() == 1);
                OpenIncident known = hub.central().events().openIncidents().get(0);
                assertEquals(incident, known.id());
                assertEquals("larkmoor/calf-barn", known.zone());
                assertTrue(known.fromAlertState());
                assertEquals(java.util.List.of(), hub.central().events().events("larkmoor"), "no event stored for a state");
                assertEquals(1.0, registry.counter("byre.central.alert.states", "result", "added").count());

                String base = "http://127.0.0.1:" + pagePort;
                String card = card(get(base + "/"), "larkmoor");
                assertTrue(card.contains("calves-cold in <span class=\"nb\">calf-barn</span>"), card);
                assertTrue(card.contains("lvl-critical") && card.contains(OpenIncident.FROM_ALERT_STATE.replace("'", "&#39;")), card);
                String site = get(base + "/site/larkmoor");
                assertTrue(site.contains("data-incident=\"" + incident + "\"") && site.contains("href=\"/ack/" + incident + "\""), site);

                String status = status(hubFile);
                assertTrue(status.contains("calves-cold in larkmoor/calf-barn") && status.contains("incident " + incident)
                        && status.contains(OpenIncident.FROM_ALERT_STATE), status);

                // The barn clears: the centre shows the alert gone, on the page and in status.
                sensors.publish("larkmoor/calf-barn/dry", "9.5");
                await().atMost(Duration.ofSeconds(20)).until(() -> barn.alerts().book().openIncidents().isEmpty());
                await().atMost(Duration.ofSeconds(20)).until(() -> hub.central().events().openIncidents().isEmpty());
                assertTrue(card(get(base + "/"), "larkmoor").contains("No open alerts"));
                assertFalse(get(base + "/site/larkmoor").contains("data-incident=\"" + incident + "\""));
                String after = status(hubFile);
                assertTrue(after.contains("open alerts: none"), after);
                assertFalse(after.contains("calves-cold"), after);
            }
        }
    }

    /** One site's card on the list of sites. */
    static String card(String html, String site) {
        int at = html.indexOf("data-site=\"" + site + "\"");
        assertTrue(at > 0, "no card for " + site + ": " + html);
        int start = html.lastIndexOf("<article", at);
        return html.substring(start, html.indexOf("</article>", at) + "</article>".length());
    }

    static String get(String url) throws Exception {
        HttpResponse<String> r = HttpClient.newHttpClient().send(HttpRequest.newBuilder(URI.create(url)).GET().build(),
                HttpResponse.BodyHandlers.ofString());
        assertEquals(200, r.statusCode(), url + ": " + r.body());
        return r.body();
    }

    /** {@code byre status --site larkmoor}, as typed beside the running centre. */
    static synchronized String status(Path config) {
        PrintStream old = System.out;
        ByteArrayOutputStream out = new ByteArrayOutputStream();
        try {
            System.setOut(new PrintStream(out, true, StandardCharsets.UTF_8));
            assertEquals(Main.OK, Main.execute("status", "--config", config.toString(), "--site", "larkmoor", "--no-color"));
        } finally {
            System.setOut(old);
        }
        return out.toString(StandardCharsets.UTF_8);
    }
}
