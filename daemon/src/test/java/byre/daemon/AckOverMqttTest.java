package byre.daemon;

import static org.awaitility.Awaitility.await;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNull;

import byre.alerts.OpenIncident;
import byre.config.ByreConfig;
import byre.history.HistoryReader;
import byre.history.StreamKey;
import byre.mqtt.EmbeddedBroker;
import byre.testing.Configs;
import byre.testing.TestPublisher;
import byre.zones.ClimateDeriver;
import io.micrometer.core.instrument.simple.SimpleMeterRegistry;
import java.nio.file.Path;
import java.time.Clock;
import java.time.Duration;
import java.time.Instant;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/** Acknowledging over MQTT ({@code <prefix>/<site>/ack}) is off unless the configuration turns it on. */
class AckOverMqttTest {
    @TempDir
    Path dir;

    Daemon start(int port, String acceptAcks) throws Exception {
        String yaml = """
                site: larkmoor
                mqtt:
                  broker: embedded
                  listen: 127.0.0.1:%d
                  client-id: byre-ack-test
                %s
                sensors:
                  shed-dry: { topic: larkmoor/cow-shed/dry, quantity: dry-bulb }
                zones:
                  cow-shed: { groups: [cows], sensors: [shed-dry] }
                history:
                  path: %s
                """.formatted(port, acceptAcks == null ? "" : "  accept-acks: " + acceptAcks, dir.resolve("history.db"));
        ByreConfig cfg = Configs.parse("test.yaml", yaml, dir, n -> null);
        return Daemon.create(cfg, Clock.systemUTC(), new SimpleMeterRegistry()).start(new ClimateDeriver());
    }

    static OpenIncident openIncident(Daemon d) {
        d.alerts().selfAlert("history-disk", true, "History disk full (test)");
        return d.alerts().book().openIncidents().get(0);
    }

    static long rows(Daemon d) {
        d.flush();
        try (HistoryReader r = d.store().openReader()) {
            return r.raw(StreamKey.sensor("shed-dry"), Instant.EPOCH, Instant.now().plusSeconds(3600)).size();
        }
    }

    @Test
    void offByDefault() throws Exception {
        int port = EmbeddedBroker.freePort("127.0.0.1");
        try (Daemon d = start(port, null)) {
            await().atMost(Duration.ofSeconds(15)).until(() -> d.link().isConnected());
            String id = openIncident(d).id();
            try (TestPublisher pub = new TestPublisher("tcp://127.0.0.1:" + port)) {
                pub.publish("byre/larkmoor/ack", "{\"incident\":\"" + id + "\",\"by\":\"mallory\"}");
                // A reading from the same client after it: once it is stored, the acknowledgement would have been handled.
                pub.publish("larkmoor/cow-shed/dry", "21.5");
            }
            await().atMost(Duration.ofSeconds(15)).until(() -> rows(d) == 1);
            assertNull(d.alerts().book().openIncidents().get(0).ackBy(), "nobody acknowledged over MQTT");
        }
    }

    @Test
    void whenTurnedOnTheNameIsCleaned() throws Exception {
        int port = EmbeddedBroker.freePort("127.0.0.1");
        try (Daemon d = start(port, "true")) {
            await().atMost(Duration.ofSeconds(15)).until(() -> d.link().isConnected());
            String id = openIncident(d).id();
            try (TestPublisher pub = new TestPublisher("tcp://127.0.0.1:" + port)) {
                pub.publish("byre/larkmoor/ack", "{\"incident\":\"" + id + "\",\"by\":\"sam\\nERROR byre - forged" + "q".repeat(90) + "\"}");
            }
            await().atMost(Duration.ofSeconds(15)).until(() -> d.alerts().book().openIncidents().get(0).ackBy() != null);
            String by = d.alerts().book().openIncidents().get(0).ackBy();
            assertEquals(("sam ERROR byre - forged" + "q".repeat(90)).substring(0, 64), by);
        }
    }
}
