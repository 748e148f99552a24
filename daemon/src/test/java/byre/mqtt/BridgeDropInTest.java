package byre.mqtt;

import static org.awaitility.Awaitility.await;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;
import static org.junit.jupiter.api.Assumptions.assumeTrue;

import byre.testing.Mosquitto;
import byre.testing.TestPublisher;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.List;
import java.util.concurrent.CopyOnWriteArrayList;
import java.util.concurrent.TimeUnit;
import org.eclipse.paho.client.mqttv3.MqttClient;
import org.eclipse.paho.client.mqttv3.MqttConnectOptions;
import org.eclipse.paho.client.mqttv3.persist.MemoryPersistence;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/**
 * The shipped mosquitto bridge drop-in ({@code config/mosquitto-bridge.conf}), run by mosquitto itself: a barn
 * broker bridged over TLS, with a password, to a central broker, both on loopback. Only the placeholders, the
 * CA path, the password and the reconnect delay are substituted.
 */
class BridgeDropInTest {
    private static final String SITE = "larkmoor";

    @TempDir
    Path dir;

    @Test
    void siteTopicsGoOutAcknowledgementsComeInAndNothingIsLostWhileTheCentreIsDown() throws Exception {
        assumeTrue(byre.testing.BrokerTls.toolsPresent(),
                "needs openssl and mosquitto_passwd (Debian packages openssl, mosquitto)");
        byre.testing.BrokerTls.Bridged pair = byre.testing.BrokerTls.Bridged.prepare(dir, SITE, root());
        int centralTls = pair.centralTls();
        int centralPlain = pair.centralPlain();
        int barnPort = pair.barnPort();
        String centralConf = pair.centralConf();
        String barnConf = pair.barnConf();

        List<String> atCentre = new CopyOnWriteArrayList<>();
        List<String> acksAtBarn = new CopyOnWriteArrayList<>();
        Mosquitto central = Mosquitto.startConfigured(centralTls, centralConf, centralPlain);
        try (Mosquitto barn = Mosquitto.startConfigured(barnPort, barnConf);
             TestPublisher atBarn = new TestPublisher(barn.uri())) {
            MqttClient watcher = subscriber("tcp://127.0.0.1:" + centralPlain, atCentre);
            atBarn.client().subscribe("byre/" + SITE + "/ack", 1,
                    (t, m) -> acksAtBarn.add(new String(m.getPayload(), StandardCharsets.UTF_8)));

            // The bridge announces itself on the centre.
            await().atMost(30, TimeUnit.SECONDS).until(() -> atCentre.contains("byre/" + SITE + "/uplink 1"));
            atBarn.publish("byre/" + SITE + "/events", "e1");
            atBarn.publish("larkmoor/calf-barn/pen1/dry", "21.5");   // a sensor topic: stays in the barn
            atBarn.publish("byre/" + SITE + "/zones/calf-pen-1/dry-bulb", "{\"value\":21.5}");
            await().atMost(30, TimeUnit.SECONDS).until(() -> atCentre.contains("byre/" + SITE + "/zones/calf-pen-1/dry-bulb {\"value\":21.5}"));

            // The centre goes away; the barn goes on; the bridge queues what it cannot send.
            watcher.disconnect();
            watcher.close();
            central.close();
            for (int i = 2; i <= 5; i++) atBarn.publish("byre/" + SITE + "/events", "e" + i);
            central = Mosquitto.startConfigured(centralTls, centralConf, centralPlain);
            watcher = subscriber("tcp://127.0.0.1:" + centralPlain, atCentre);
            await().atMost(60, TimeUnit.SECONDS).until(() -> events(atCentre).size() >= 5);
            assertEquals(List.of("e1", "e2", "e3", "e4", "e5"), events(atCentre), "every event once, in order");

            // An acknowledgement made at the centre reaches the barn, and is not sent back out.
            try (TestPublisher atCentral = new TestPublisher("tcp://127.0.0.1:" + centralPlain)) {
                atCentral.publish("byre/" + SITE + "/ack", "{\"incident\":\"ab12\",\"by\":\"Ann\"}");
            }
            await().atMost(30, TimeUnit.SECONDS).until(() -> acksAtBarn.size() == 1);
            atBarn.publish("byre/" + SITE + "/events", "e6");
            await().atMost(30, TimeUnit.SECONDS).until(() -> events(atCentre).size() == 6);
            assertEquals(1, atCentre.stream().filter(s -> s.startsWith("byre/" + SITE + "/ack ")).count(),
                    "the acknowledgement came back from the barn: " + atCentre);
            assertTrue(atCentre.stream().noneMatch(s -> s.startsWith("larkmoor/")), "a sensor topic crossed the bridge: " + atCentre);
            watcher.disconnect();
            watcher.close();
        } finally {
            central.close();
        }
    }

    /** A persistent session on the centre, so what arrives while it reconnects is kept for it. */
    private static MqttClient subscriber(String uri, List<String> into) throws Exception {
        MqttClient c = new MqttClient(uri, "centre-watcher", new MemoryPersistence());
        MqttConnectOptions o = new MqttConnectOptions();
        o.setCleanSession(false);
        c.connect(o);
        c.subscribe("#", 1, (t, m) -> into.add(t + " " + new String(m.getPayload(), StandardCharsets.UTF_8)));
        return c;
    }

    private static List<String> events(List<String> seen) {
        String prefix = "byre/" + SITE + "/events ";
        return seen.stream().filter(s -> s.startsWith(prefix)).map(s -> s.substring(prefix.length())).toList();
    }

    private static Path root() {
        String r = System.getProperty("byre.root");
        return r != null ? Path.of(r) : Path.of("..");
    }
}
