package byre.daemon;

import static org.awaitility.Awaitility.await;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import byre.config.ByreConfig;
import byre.history.HistoryReader;
import byre.history.StreamKey;
import byre.mqtt.EmbeddedBroker;
import byre.testing.Configs;
import byre.testing.Mosquitto;
import byre.testing.TestPublisher;
import byre.units.Quantity;
import byre.zones.ClimateDeriver;
import io.micrometer.core.instrument.simple.SimpleMeterRegistry;
import java.nio.file.Path;
import java.sql.Connection;
import java.sql.DriverManager;
import java.sql.ResultSet;
import java.time.Clock;
import java.time.Duration;
import java.time.Instant;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/**
 * Configuration + a real broker (byre's embedded one, and Debian's mosquitto started by the test)
 * + a real SQLite file: readings published by a Paho client end up as rows; bad ones as counted
 * rejections; a restart against a persistent session loses no QoS 1 reading.
 */
class IngestIntegrationTest {
    @TempDir
    Path dir;

    static String config(String broker, int listenPort, Path db) {
        return """
                site: larkmoor
                timezone: Europe/London
                mqtt:
                  broker: %s
                  listen: 127.0.0.1:%d
                  client-id: byre-test-%d
                sensors:
                  pen1-dry: { topic: larkmoor/calf-barn/pen1/dry, quantity: dry-bulb, unit: F }
                  pen1-wet: { topic: larkmoor/calf-barn/pen1/wet, quantity: wet-bulb, unit: F }
                  pen1-air: { topic: larkmoor/calf-barn/pen1/air, quantity: air-speed, unit: ft/min, payload: "json:speed", time: "json:ts" }
                  shed-dry: { topic: larkmoor/cow-shed/dry, quantity: dry-bulb }
                  shed-rh:  { topic: larkmoor/cow-shed/senml, quantity: rh, payload: "senml:shed/rh" }
                zones:
                  calf-pen-1: { groups: [calves], sensors: [pen1-dry, pen1-wet, pen1-air], elevation: 240 m }
                  cow-shed:   { groups: [cows], sensors: [shed-dry, shed-rh] }
                history:
                  path: %s
                """.formatted(broker, listenPort, listenPort, db);
    }

    Daemon start(String broker, int listenPort, SimpleMeterRegistry registry) throws Exception {
        ByreConfig cfg = Configs.parse("test.yaml", config(broker, listenPort, dir.resolve("history.db")), dir, n -> null);
        return Daemon.create(cfg, Clock.systemUTC(), registry).start(new ClimateDeriver());
    }

    static long rows(Daemon d, StreamKey key) {
        try (HistoryReader r = d.store().openReader()) {
            return r.raw(key, Instant.EPOCH, Instant.now().plusSeconds(3600)).size();
        }
    }

    void exercise(Daemon d, String uri, SimpleMeterRegistry registry) throws Exception {
        await().atMost(Duration.ofSeconds(15)).until(() -> d.link().isConnected());
        try (TestPublisher pub = new TestPublisher(uri)) {
            pub.publish("larkmoor/calf-barn/pen1/dry", "41");          // 5 C
            pub.publish("larkmoor/calf-barn/pen1/wet", "39.2");        // 4 C
            pub.publish("larkmoor/calf-barn/pen1/air", "{\"speed\": 400, \"ts\": " + Instant.now().getEpochSecond() + "}");
            pub.publish("larkmoor/cow-shed/dry", "24.5");
            pub.publish("larkmoor/cow-shed/senml", "[{\"bn\":\"shed/\",\"n\":\"rh\",\"u\":\"%RH\",\"v\":71.2}]");
            pub.publish("larkmoor/calf-barn/pen1/dry", "warm");
            pub.publish("larkmoor/calf-barn/pen1/dry", "NaN");
            pub.publish("larkmoor/cow-shed/dry", "150");
            pub.publish("larkmoor/cow-shed/senml", "{\"v\":1}");
        }
        await().atMost(Duration.ofSeconds(15)).untilAsserted(() -> {
            assertEquals(2.0, registry.counter("byre.readings.rejected", "reason", "unparseable").count(), 0.0, "unparseable");
            assertEquals(1.0, registry.counter("byre.readings.rejected", "reason", "not-finite").count(), 0.0, "not-finite");
            assertEquals(1.0, registry.counter("byre.readings.rejected", "reason", "out-of-range").count(), 0.0, "out-of-range");
        });
        await().atMost(Duration.ofSeconds(15)).untilAsserted(() -> {
            d.flush();
            assertEquals(1, rows(d, StreamKey.sensor("pen1-dry")));
            assertEquals(1, rows(d, StreamKey.sensor("shed-rh")));
            assertTrue(rows(d, StreamKey.zone("calf-pen-1", Quantity.RH)) >= 1, "derived rh stored");
            assertTrue(rows(d, StreamKey.zone("calf-pen-1", Quantity.WIND_CHILL)) >= 1, "derived wind chill stored");
            assertTrue(rows(d, StreamKey.zone("cow-shed", Quantity.THI)) >= 1, "derived THI stored");
        });
        try (HistoryReader r = d.store().openReader()) {
            double dry = r.raw(StreamKey.sensor("pen1-dry"), Instant.EPOCH, Instant.now().plusSeconds(60)).get(0).value();
            assertEquals(5.0, dry, 1e-9, "41 F stored as 5 C (0 C = 32 F, common practice)");
        }
        try (Connection c = DriverManager.getConnection("jdbc:sqlite:" + dir.resolve("history.db"));
             ResultSet rs = c.createStatement().executeQuery("PRAGMA journal_mode")) {
            rs.next();
            assertEquals("wal", rs.getString(1));
        }
    }

    @Test
    void embeddedBrokerToSqlite() throws Exception {
        SimpleMeterRegistry registry = new SimpleMeterRegistry();
        int port = EmbeddedBroker.freePort("127.0.0.1");
        try (Daemon d = start("embedded", port, registry)) {
            exercise(d, "tcp://127.0.0.1:" + port, registry);
        }
    }

    /**
     * The embedded broker stops sending after 10 unacknowledged messages; byre, which acknowledges after the commit
     * that holds a reading, must commit early when the broker waits on it rather than wait out its 2 s interval each
     * time (which held this stream to 5 readings a second: 600 readings took two minutes).
     */
    @Test
    void aQos1BurstThroughTheEmbeddedBrokerIsNotHeldToOneWindowPerCommitInterval() throws Exception {
        int port = EmbeddedBroker.freePort("127.0.0.1");
        try (Daemon d = start("embedded", port, new SimpleMeterRegistry())) {
            await().atMost(Duration.ofSeconds(15)).until(() -> d.link().isConnected());
            try (TestPublisher pub = new TestPublisher("tcp://127.0.0.1:" + port)) {
                for (int i = 0; i < 600; i++) pub.publish("larkmoor/cow-shed/dry", String.valueOf(10 + (i % 100) / 10.0));
            }
            // 600 readings at one window (10) per 2 s commit would take 120 s; early commits take a few seconds.
            await().atMost(Duration.ofSeconds(40)).until(() -> rows(d, StreamKey.sensor("shed-dry")) == 600);
        }
    }

    @Test
    void mosquittoToSqlite() throws Exception {
        SimpleMeterRegistry registry = new SimpleMeterRegistry();
        try (Mosquitto m = Mosquitto.start(); Daemon d = start(m.uri(), 0, registry)) {
            exercise(d, m.uri(), registry);
        }
    }

    @Test
    void noQos1ReadingLostWhileByreIsStopped() throws Exception {
        try (Mosquitto m = Mosquitto.start()) {
            int id = Mosquitto.freePort(); // used only to make the client id unique per test run
            try (Daemon d = start(m.uri(), id, new SimpleMeterRegistry())) {
                await().atMost(Duration.ofSeconds(15)).until(() -> d.link().isConnected());
            }
            // byre is down; its persistent session keeps what arrives now.
            long t0 = Instant.now().getEpochSecond() - 200;
            try (TestPublisher pub = new TestPublisher(m.uri())) {
                for (int i = 0; i < 150; i++) {
                    pub.publish("larkmoor/calf-barn/pen1/air", "{\"speed\": " + (100 + i) + ", \"ts\": " + (t0 + i) + "}");
                }
            }
            try (Daemon d = start(m.uri(), id, new SimpleMeterRegistry())) {
                await().atMost(Duration.ofSeconds(20)).untilAsserted(() -> {
                    d.flush();
                    assertEquals(150, rows(d, StreamKey.sensor("pen1-air")));
                });
            }
        }
    }
}
