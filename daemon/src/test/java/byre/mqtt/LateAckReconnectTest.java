package byre.mqtt;

import static org.awaitility.Awaitility.await;

import byre.config.MqttSettings;
import byre.testing.Mosquitto;
import io.micrometer.core.instrument.simple.SimpleMeterRegistry;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Duration;
import java.util.List;
import java.util.UUID;
import java.util.concurrent.CopyOnWriteArrayList;
import org.eclipse.paho.client.mqttv3.MqttClient;
import org.eclipse.paho.client.mqttv3.MqttConnectOptions;
import org.eclipse.paho.client.mqttv3.persist.MemoryPersistence;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.Timeout;
import org.junit.jupiter.api.io.TempDir;

/**
 * Acknowledgements of readings that were still being stored when the broker went away arrive while the link
 * reconnects. Handing those to the MQTT client then could leave its connect waiting for ever (found with
 * acknowledgements held back by a slow commit); they are dropped instead, and the broker delivers again.
 */
class LateAckReconnectTest {
    @TempDir
    Path dir;

    @Test
    @Timeout(60)
    void acknowledgementsFromAnEarlierConnectionDoNotStopTheReconnect() throws Exception {
        Path state = Files.createDirectories(dir.resolve("broker-state"));
        Mosquitto m = Mosquitto.start(Mosquitto.freePort(), state);
        int port = m.port();
        List<Runnable> heldAcks = new CopyOnWriteArrayList<>();
        MqttLink link = new MqttLink(new MqttSettings(m.uri(), null, 0, "byre-late-ack-" + UUID.randomUUID().toString().substring(0, 8),
                null, null, "byre", 1, null), "larkmoor", new SimpleMeterRegistry());
        link.subscribeAcked("larkmoor/calf-barn/#", (topic, payload, retained, ack) -> heldAcks.add(ack));
        try {
            link.start();
            await().atMost(Duration.ofSeconds(10)).until(link::isConnected);
            MqttClient sensor = new MqttClient(m.uri(), "late-ack-sensor-" + UUID.randomUUID().toString().substring(0, 8), new MemoryPersistence());
            MqttConnectOptions o = new MqttConnectOptions();
            o.setCleanSession(true);
            // Paho may count a publication as in flight for a moment after its synchronous publish returned; with
            // the default window of 10 a quick run of 40 then fails with "Too many publishes in progress".
            o.setMaxInflight(100);
            sensor.connect(o);
            for (int i = 0; i < 40; i++) {
                sensor.publish("larkmoor/calf-barn/pen1/dry", ("21." + i).getBytes(StandardCharsets.UTF_8), 1, false);
            }
            sensor.disconnect();
            sensor.close();
            await().atMost(Duration.ofSeconds(10)).until(() -> heldAcks.size() >= 40);

            m.kill();
            await().atMost(Duration.ofSeconds(10)).until(() -> !link.isConnected());
            // The held acknowledgements go out one by one across the reconnect, as commits would release them.
            Thread releaser = new Thread(() -> {
                for (Runnable ack : List.copyOf(heldAcks)) {
                    ack.run();
                    try {
                        Thread.sleep(25);
                    } catch (InterruptedException e) {
                        return;
                    }
                }
            });
            releaser.start();
            Thread.sleep(300);
            m = Mosquitto.start(port, state);
            await().atMost(Duration.ofSeconds(8)).until(link::isConnected);
            releaser.join();
        } finally {
            link.close();
            m.close();
        }
    }
}
