package byre.ops;

import static org.awaitility.Awaitility.await;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;
import static org.junit.jupiter.api.Assumptions.assumeTrue;

import byre.config.BrokerAcl;
import byre.config.ByreConfig;
import byre.testing.Configs;
import byre.testing.Mosquitto;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Duration;
import java.util.List;
import java.util.concurrent.CopyOnWriteArrayList;
import java.util.concurrent.TimeUnit;
import org.eclipse.paho.client.mqttv3.MqttClient;
import org.eclipse.paho.client.mqttv3.MqttConnectOptions;
import org.eclipse.paho.client.mqttv3.MqttException;
import org.eclipse.paho.client.mqttv3.MqttSecurityException;
import org.eclipse.paho.client.mqttv3.persist.MemoryPersistence;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/**
 * The package's mosquitto drop-in ({@code config/mosquitto-barn.conf}) and the access list {@code byre broker-acl}
 * writes, run by Debian's mosquitto itself on a free loopback port: anonymous clients are refused, the sensors login
 * may only publish readings, the operators login may acknowledge, byre gets what it needs.
 */
class BrokerDropInTest {
    static final Path DROP_IN = Path.of("..", "config", "mosquitto-barn.conf");

    @TempDir
    Path dir;

    static MqttClient connect(int port, String user, String password) throws MqttException {
        MqttClient c = new MqttClient("tcp://127.0.0.1:" + port, user == null ? "anon" : user + "-test", new MemoryPersistence());
        MqttConnectOptions o = new MqttConnectOptions();
        o.setCleanSession(true);
        o.setConnectionTimeout(10);
        if (user != null) {
            o.setUserName(user);
            o.setPassword(password.toCharArray());
        }
        c.connect(o);
        return c;
    }

    static void publish(MqttClient c, String topic, String payload) throws MqttException {
        c.publish(topic, payload.getBytes(StandardCharsets.UTF_8), 1, false); // waits for the PUBACK
    }

    @Test
    void theDropInRefusesStrangersAndGivesEachLoginItsJob() throws Exception {
        assumeTrue(Files.isExecutable(Path.of("/usr/bin/mosquitto_passwd")), "mosquitto is not installed (CI installs it)");
        Files.writeString(dir.resolve("mqtt.secret"), "byre-pw\n");
        ByreConfig cfg = Configs.parse("byre.yaml", """
                site: larkmoor
                mqtt: { broker: "tcp://127.0.0.1:1883", username: byre, password-file: mqtt.secret }
                sensors:
                  pen1-dry: { topic: larkmoor/calf-barn/pen1/dry, quantity: dry-bulb }
                  pens-air: { topic: larkmoor/calf-barn/+/air, quantity: air-speed, id-level: 3 }
                zones:
                  calf-pen-1: { sensors: [pen1-dry] }
                notify:
                  barn-siren: { type: mqtt, topic: larkmoor/calf-barn/siren/set }
                """, dir, n -> null);
        // Passwords as byre-broker writes them: plain "name:password" lines hashed in place by mosquitto_passwd -U.
        Path passwd = dir.resolve("passwd");
        Files.writeString(passwd, "byre:byre-pw\noperators:op-pw\nsensors:sensor-pw\npen2-gateway:gw-pw\n");
        Process hash = new ProcessBuilder("/usr/bin/mosquitto_passwd", "-U", passwd.toString()).redirectErrorStream(true).start();
        assertTrue(hash.waitFor(20, TimeUnit.SECONDS));
        assertEquals(0, hash.exitValue(), new String(hash.getInputStream().readAllBytes(), StandardCharsets.UTF_8));
        String acl = BrokerAcl.render(cfg, BrokerAcl.logins(Files.readAllLines(passwd)));

        String dropIn = Files.readString(DROP_IN);
        assertTrue(dropIn.contains("\nlistener 1883\n") && dropIn.contains("\nallow_anonymous false\n"), dropIn);
        int port = Mosquitto.freePort();
        Files.writeString(dir.resolve("acl"), acl);
        // The shipped file with only the port, the address and the folder of its two files substituted.
        String conf = dropIn.replace("\nlistener 1883\n", "\nlistener " + port + " 127.0.0.1\n").replace("/etc/mosquitto/byre/", dir + "/")
                + "\npersistence false\nuser " + System.getProperty("user.name") + "\n"; // as root: stay root, to read the test's folder
        try (Mosquitto m = Mosquitto.startConfigured(port, conf)) {
            MqttSecurityException anonymous = assertThrows(MqttSecurityException.class, () -> connect(port, null, null));
            assertEquals(MqttException.REASON_CODE_NOT_AUTHORIZED, anonymous.getReasonCode(), "anonymous clients are refused");
            MqttSecurityException wrong = assertThrows(MqttSecurityException.class, () -> connect(port, "sensors", "guess"));
            assertTrue(wrong.getReasonCode() == MqttException.REASON_CODE_FAILED_AUTHENTICATION
                    || wrong.getReasonCode() == MqttException.REASON_CODE_NOT_AUTHORIZED, wrong.toString());

            List<String> byreSaw = new CopyOnWriteArrayList<>();
            MqttClient byre = connect(port, "byre", "byre-pw");
            for (String filter : List.of("larkmoor/calf-barn/pen1/dry", "larkmoor/calf-barn/+/air", "byre/larkmoor/ack")) {
                byre.subscribe(filter, 1, (t, msg) -> byreSaw.add(t + " " + new String(msg.getPayload(), StandardCharsets.UTF_8)));
            }
            List<String> sensorSaw = new CopyOnWriteArrayList<>();
            MqttClient sensors = connect(port, "sensors", "sensor-pw");
            int granted = sensors.subscribeWithResponse("#", 1, (t, msg) -> sensorSaw.add(t)).getGrantedQos()[0];
            MqttClient gateway = connect(port, "pen2-gateway", "gw-pw");
            MqttClient operators = connect(port, "operators", "op-pw");
            List<String> operatorsSaw = new CopyOnWriteArrayList<>();
            operators.subscribe("#", 1, (t, msg) -> operatorsSaw.add(t)); // to see what a device really publishes

            publish(sensors, "byre/larkmoor/ack", "{\"incident\":\"i1\",\"by\":\"a sensor\"}"); // denied: dropped by mosquitto
            publish(sensors, "larkmoor/calf-barn/pen1/dry", "5.5");
            publish(gateway, "larkmoor/calf-barn/pen2/air", "0.4");
            publish(gateway, "larkmoor/calf-barn/siren/set", "on"); // only byre may sound the siren
            publish(byre, "byre/larkmoor/status", "online");
            publish(byre, "larkmoor/calf-barn/siren/set", "off");
            publish(operators, "byre/larkmoor/ack", "{\"incident\":\"i1\",\"by\":\"sam\"}");
            await().atMost(Duration.ofSeconds(10)).until(() -> byreSaw.contains("byre/larkmoor/ack {\"incident\":\"i1\",\"by\":\"sam\"}"));
            // Everything above was acknowledged before the operators' message was sent, so anything forwarded arrived before it.
            assertEquals(List.of("larkmoor/calf-barn/pen1/dry 5.5", "larkmoor/calf-barn/pen2/air 0.4", "byre/larkmoor/ack {\"incident\":\"i1\",\"by\":\"sam\"}"),
                    byreSaw, "byre got the readings and the operators' acknowledgement, not the sensors' one");
            await().atMost(Duration.ofSeconds(10)).until(() -> operatorsSaw.contains("byre/larkmoor/ack"));
            assertTrue(operatorsSaw.containsAll(List.of("larkmoor/calf-barn/pen1/dry", "larkmoor/calf-barn/pen2/air", "byre/larkmoor/status")),
                    operatorsSaw.toString());
            assertEquals(List.of(), sensorSaw, "the sensors login reads nothing, '#' included (granted QoS " + granted + ")");
            for (MqttClient c : List.of(byre, sensors, gateway, operators)) {
                c.disconnect();
                c.close();
            }
        }
    }

    @Test
    void theAccessListNamesEachLoginsTopics() throws Exception {
        Files.writeString(dir.resolve("mqtt.secret"), "pw\n");
        ByreConfig cfg = Configs.parse("byre.yaml", """
                site: larkmoor
                mqtt: { broker: "tcp://127.0.0.1:1883", username: byre, password-file: mqtt.secret, publish-prefix: farm }
                sensors:
                  shed-dry: { topic: larkmoor/cow-shed/dry, quantity: dry-bulb }
                zones:
                  cow-shed: { sensors: [shed-dry] }
                notify:
                  barn-siren: { type: mqtt, topic: larkmoor/cow-shed/siren/set }
                """, dir, n -> null);
        String acl = BrokerAcl.render(cfg, List.of("byre", "operators", "sensors", "hutch-node"));
        assertTrue(acl.contains("\nuser byre\ntopic read larkmoor/cow-shed/dry\ntopic readwrite farm/larkmoor/#\ntopic write larkmoor/cow-shed/siren/set\n"), acl);
        assertTrue(acl.contains("\nuser operators\ntopic write farm/larkmoor/ack\ntopic read #\n"), acl);
        assertTrue(acl.contains("\nuser sensors\ntopic write larkmoor/cow-shed/dry\n"), acl);
        assertTrue(acl.endsWith("\nuser hutch-node\ntopic write larkmoor/cow-shed/dry\n"), acl);
        assertEquals(1, acl.split("\nuser sensors\n", -1).length - 1, "each login once");
        assertThrows(IllegalArgumentException.class, () -> BrokerAcl.render(cfg, List.of("bad\nuser byre")));
        assertEquals(List.of("byre", "sensors"), BrokerAcl.logins(List.of("byre:$7$x", "# note", "sensors:$7$y", "")));
    }
}
