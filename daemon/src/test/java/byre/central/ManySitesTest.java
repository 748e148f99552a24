package byre.central;

import static org.awaitility.Awaitility.await;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;
import static org.junit.jupiter.api.Assumptions.assumeTrue;

import byre.alerts.AckResult;
import byre.config.ByreConfig;
import byre.daemon.Daemon;
import byre.history.HistoryReader;
import byre.history.HistoryRow;
import byre.history.StreamKey;
import byre.json.Json;
import byre.testing.ConfigYaml;
import byre.testing.Mosquitto;
import byre.testing.TestPublisher;
import byre.units.Quantity;
import byre.zones.ClimateDeriver;
import io.micrometer.core.instrument.simple.SimpleMeterRegistry;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Clock;
import java.time.Duration;
import java.time.Instant;
import java.util.List;
import java.util.Map;
import java.util.Set;
import java.util.TreeMap;
import java.util.concurrent.ConcurrentSkipListMap;
import java.util.concurrent.TimeUnit;
import java.util.stream.Collectors;
import org.eclipse.paho.client.mqttv3.MqttClient;
import org.eclipse.paho.client.mqttv3.MqttConnectOptions;
import org.eclipse.paho.client.mqttv3.persist.MemoryPersistence;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/**
 * Many barns, one view, end to end: a barn broker bridged by the shipped drop-in ({@code config/mosquitto-bridge.conf},
 * TLS, ports substituted) to a central broker, a barn byre and a central byre. The centre gets the barn's events and
 * zone streams; while the central broker is down the barn raises and clears an alert, and afterwards every event is
 * at the centre once, in order, and the central history has every zone value the barn published meanwhile. An
 * acknowledgement made at the centre reaches the barn; the barn's byre going away raises "site offline" at the centre.
 */
class ManySitesTest {
    private static final String DRY = "byre/larkmoor/zones/cow-shed/dry-bulb";

    @TempDir
    Path dir;

    @Test
    void theCentreSeesEveryEventAndValueOfABarnAcrossAnOutageAndAcknowledgesThroughTheBridge() throws Exception {
        assumeTrue(byre.testing.BrokerTls.toolsPresent(),
                "needs openssl and mosquitto_passwd (Debian packages openssl, mosquitto)");
        byre.testing.BrokerTls.Bridged pair = byre.testing.BrokerTls.Bridged.prepare(dir, "larkmoor", root());
        int centralTls = pair.centralTls();
        int centralPlain = pair.centralPlain();
        int barnPort = pair.barnPort();
        String centralConf = pair.centralConf();
        String barnConf = pair.barnConf();

        Path barnRules = Files.createDirectories(dir.resolve("barn-rules"));
        Files.writeString(barnRules.resolve("warm.rules"),
                "watch shed-warm\n  raise when cow-shed.dry-bulb > 30\n  clear when cow-shed.dry-bulb < 28\n  notify office\n");
        ByreConfig barnCfg = ConfigYaml.barn().broker(barnPort).acceptAcks()
                .sensor("shed-dry", "larkmoor/cow-shed/dry", "dry-bulb").sensor("shed-rh", "larkmoor/cow-shed/rh", "rh")
                .zone("cow-shed", "shed-dry", "shed-rh").parse("barn.yaml", dir);
        Path centralRules = Files.createDirectories(dir.resolve("central-rules"));
        Files.writeString(centralRules.resolve("sites.rules"), ConfigYaml.SITE_DOWN + """
                watch dairy-hot
                  raise when @dairy.thi > 90
                  notify office
                """);
        ByreConfig centralCfg = ConfigYaml.centre().broker(centralPlain).site("larkmoor", "zones: [cow-shed], groups: [dairy]")
                .parse("central.yaml", dir);

        // What the barn publishes on its zone stream, seen on the barn's own broker: value by reading time.
        Map<Instant, Double> barnDry = new ConcurrentSkipListMap<>();
        Mosquitto central = Mosquitto.startConfigured(centralTls, centralConf, centralPlain);
        Daemon barnByre = null;
        try (Mosquitto barn = Mosquitto.startConfigured(barnPort, barnConf);
             TestPublisher sensors = new TestPublisher(barn.uri());
             Daemon centre = Daemon.create(centralCfg, Clock.systemUTC(), new SimpleMeterRegistry()).start(new ClimateDeriver())) {
            barnByre = Daemon.create(barnCfg, Clock.systemUTC(), new SimpleMeterRegistry()).start(new ClimateDeriver());
            MqttClient watcher = watch(barn.uri(), barnDry);
            CentralConsumer hub = centre.central();
            await().atMost(30, TimeUnit.SECONDS).until(() -> Double.valueOf(1.0).equals(hub.links().online("larkmoor")));

            // An alert at the barn: the centre gets the event and the zone streams (THI as the barn derived it).
            sensors.publish("larkmoor/cow-shed/rh", "50");
            sensors.publish("larkmoor/cow-shed/dry", "31.5");
            await().atMost(30, TimeUnit.SECONDS).until(() -> kinds(hub).equals(List.of("raised")));
            await().atMost(30, TimeUnit.SECONDS).until(() -> centre.zones().latest("larkmoor/cow-shed", Quantity.DRY_BULB) == 31.5
                    && !Double.isNaN(centre.zones().latest("larkmoor/cow-shed", Quantity.THI)));
            assertEquals(1, centre.openAlerts().size(), "the barn's open alert shows at the centre: " + centre.openAlerts());
            assertEquals("larkmoor/cow-shed", centre.openAlerts().get(0).zone());
            sensors.publish("larkmoor/cow-shed/dry", "26.0");
            await().atMost(30, TimeUnit.SECONDS).until(() -> kinds(hub).size() == 2);

            // The central broker goes away; the barn raises and clears another alert, and its values go on.
            central.close();
            await().atMost(10, TimeUnit.SECONDS).until(() -> !centre.link().isConnected());
            Set<Instant> before = Set.copyOf(barnDry.keySet());
            double[] during = {29.0, 30.5, 31.0, 27.5, 27.0};
            for (double v : during) {
                sensors.publish("larkmoor/cow-shed/dry", Double.toString(v));
                await().atMost(10, TimeUnit.SECONDS).until(() -> barnDry.containsValue(v));
            }
            central = Mosquitto.startConfigured(centralTls, centralConf, centralPlain);

            // Every event once, in order; every value of the outage in the central history.
            await().atMost(40, TimeUnit.SECONDS).until(() -> kinds(hub).size() >= 4);
            assertEquals(List.of("raised", "cleared", "raised", "cleared"), kinds(hub), "every event once, in order");
            List<String> ids = hub.events().events("larkmoor").stream().map(s -> s.event().id()).toList();
            assertEquals(ids.size(), Set.copyOf(ids).size(), "no event twice: " + ids);
            Map<Instant, Double> published = new TreeMap<>(barnDry);
            published.keySet().removeAll(before);
            Instant outageFrom = published.keySet().stream().min(Instant::compareTo).orElseThrow();
            assertTrue(published.values().containsAll(List.of(29.0, 30.5, 31.0, 27.5, 27.0)), "published during the outage: " + published);
            await().atMost(30, TimeUnit.SECONDS).untilAsserted(() -> {
                Map<Instant, Double> stored = centralRows(centre, outageFrom);
                stored.keySet().retainAll(published.keySet());
                assertEquals(published, stored, "the centre stores every value the barn published, as it published it");
            });

            // Acknowledged at the centre, recorded at the barn, reported back to the centre.
            sensors.publish("larkmoor/cow-shed/dry", "33.0");
            await().atMost(30, TimeUnit.SECONDS).until(() -> kinds(hub).size() == 5);
            String incident = hub.events().events("larkmoor").get(4).event().incident();
            AckResult ack = centre.acknowledge(incident, "Ann");
            assertEquals(AckResult.Status.ACKNOWLEDGED, ack.status(), ack.detail());
            Daemon barnNow = barnByre;
            await().atMost(30, TimeUnit.SECONDS).until(() -> barnNow.alerts().book().openIncidents().stream()
                    .anyMatch(i -> i.id().equals(incident) && "Ann".equals(i.ackBy())));
            await().atMost(30, TimeUnit.SECONDS).until(() -> "Ann".equals(centre.openAlerts().stream()
                    .filter(a -> a.incident().equals(incident)).findFirst().map(a -> a.acknowledgedBy()).orElse(null)));
            assertEquals(AckResult.Status.ALREADY, centre.acknowledge(incident, "Bob").status());

            // The barn's byre goes away: its last word (offline) crosses the bridge and the centre raises "site offline".
            barnByre.close();
            barnByre = null;
            await().atMost(30, TimeUnit.SECONDS).until(() -> centre.alerts().book().openIncidents().stream()
                    .anyMatch(i -> i.watch().equals("site-down") && i.zone().equals("larkmoor")));
            assertFalse(centre.alerts().book().openIncidents().stream().anyMatch(i -> i.watch().equals("dairy-hot")));
            watcher.disconnect();
            watcher.close();
        } finally {
            if (barnByre != null) barnByre.close();
            central.close();
        }
    }

    private static List<String> kinds(CentralConsumer hub) throws Exception {
        return hub.events().events("larkmoor").stream().map(s -> s.event().kind().id()).toList();
    }

    /** The raw rows of the central zone's dry-bulb stream since {@code from}. */
    private static Map<Instant, Double> centralRows(Daemon centre, Instant from) {
        centre.flush();
        Map<Instant, Double> out = new TreeMap<>();
        try (HistoryReader r = centre.store().openReader()) {
            for (HistoryRow row : r.raw(StreamKey.sensor("larkmoor/cow-shed/dry-bulb"), from.minusSeconds(5), Instant.now().plusSeconds(60))) {
                out.put(row.at(), row.value());
            }
        }
        return out;
    }

    private static MqttClient watch(String uri, Map<Instant, Double> into) throws Exception {
        MqttClient c = new MqttClient(uri, "barn-watcher", new MemoryPersistence());
        c.connect(new MqttConnectOptions());
        c.subscribe(DRY, 1, (t, m) -> {
            Map<?, ?> j = (Map<?, ?>) Json.parse(new String(m.getPayload(), StandardCharsets.UTF_8));
            // The history keeps milliseconds.
            into.put(Instant.parse((String) j.get("at")).truncatedTo(java.time.temporal.ChronoUnit.MILLIS), (Double) j.get("value"));
        });
        return c;
    }

    private static Path root() {
        String r = System.getProperty("byre.root");
        return r != null ? Path.of(r) : Path.of("..");
    }
}
