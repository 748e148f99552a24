package byre.faults;

import static org.awaitility.Awaitility.await;
import static org.junit.jupiter.api.Assertions.assertEquals;

import byre.config.ByreConfig;
import byre.daemon.Daemon;
import byre.history.StoredReadings;
import byre.rules.eval.AlertState;
import byre.testing.Configs;
import byre.testing.Mosquitto;
import byre.testing.TestPublisher;
import byre.zones.ClimateDeriver;
import io.micrometer.core.instrument.simple.SimpleMeterRegistry;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Clock;
import java.time.Duration;
import java.util.UUID;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.Timeout;
import org.junit.jupiter.api.io.TempDir;

/**
 * Readings that are not "now", through mosquitto (which sets the retain flag on what it sends because byre
 * subscribed): a reading two days old, a buffer of readings three hours old, a dead sensor's retained last value
 * with and without its own time. All timed ones are stored; none of them raises a watch; an untimed retained value
 * is not stored at all, also not after byre restarts. A reading of now still raises, so the watch is not just deaf.
 */
class StaleReadingsTest {
    @TempDir
    Path dir;

    static final String RULES = """
            watch hot-shed
              raise when cow-shed.dry-bulb > 30 C
              clear when cow-shed.dry-bulb < 28 C
              level warning
            """;

    ByreConfig config(String uri, String clientId) throws Exception {
        Files.writeString(dir.resolve("shed.rules"), RULES);
        return Configs.parse("stale.yaml", """
                site: larkmoor
                timezone: Europe/London
                mqtt: { broker: %s, client-id: %s }
                sensors:
                  shed-dry: { topic: larkmoor/cow-shed/dry, quantity: dry-bulb, payload: "json:v", time: "json:ts" }
                  shed-rh:  { topic: larkmoor/cow-shed/rh, quantity: rh, unit: "%%" }
                zones:
                  cow-shed: { groups: [cows], sensors: [shed-dry, shed-rh] }
                rules: shed.rules
                history: { path: history.db }
                """.formatted(uri, clientId), dir, n -> null);
    }

    long rows(String sensor) throws Exception {
        return StoredReadings.count(dir.resolve("history.db"), sensor);
    }

    static String dry(double v, long tsMs) {
        return "{\"v\":" + v + ",\"ts\":" + tsMs + "}";
    }

    @Test
    @Timeout(90)
    void oldReadingsAndRetainedValuesAreStoredButRaiseNothing() throws Exception {
        String clientId = "byre-stale-" + UUID.randomUUID().toString().substring(0, 8);
        long now = System.currentTimeMillis();
        long twoDaysAgo = now - Duration.ofDays(2).toMillis();
        try (Mosquitto m = Mosquitto.start(); TestPublisher sensors = new TestPublisher(m.uri())) {
            // The sensors' last words before they died, retained by the broker.
            sensors.publish("larkmoor/cow-shed/dry", dry(35, twoDaysAgo), 1, true);
            sensors.publish("larkmoor/cow-shed/rh", "55", 1, true);
            SimpleMeterRegistry registry = new SimpleMeterRegistry();
            try (Daemon d = Daemon.create(config(m.uri(), clientId), Clock.systemUTC(), registry).start(new ClimateDeriver())) {
                await().atMost(Duration.ofSeconds(15)).until(() -> d.link().isConnected());
                // A sensor flushing its buffer after an outage: readings of three hours ago, a minute apart.
                for (int i = 0; i < 10; i++) sensors.publish("larkmoor/cow-shed/dry", dry(36, now - Duration.ofHours(3).toMillis() + i * 60_000L));
                await().atMost(Duration.ofSeconds(10)).until(() -> d.processed() >= 11);
                d.flush();
                assertEquals(11, rows("shed-dry"), "the retained timed value and the buffer are stored");
                assertEquals(0, rows("shed-rh"), "a retained value of unknown age is not a reading");
                assertEquals(AlertState.CLEAR, d.watches().engine().state("hot-shed", "cow-shed"));
                assertEquals(1.0, registry.counter("byre.readings.retained.untimed").count());
            }
            // Restarted: the broker sends the retained values again.
            SimpleMeterRegistry again = new SimpleMeterRegistry();
            try (Daemon d = Daemon.create(config(m.uri(), clientId), Clock.systemUTC(), again).start(new ClimateDeriver())) {
                await().atMost(Duration.ofSeconds(15)).until(() -> d.link().isConnected());
                // Both retained values handled: the untimed one counted (or, wrongly, taken as a second reading).
                await().atMost(Duration.ofSeconds(10)).until(() -> d.processed() >= 1
                        && (again.counter("byre.readings.retained.untimed").count() == 1 || d.processed() >= 2));
                d.flush();
                assertEquals(11, rows("shed-dry"), "the retained value is stored once");
                assertEquals(0, rows("shed-rh"));
                assertEquals(AlertState.CLEAR, d.watches().engine().state("hot-shed", "cow-shed"));
                // A reading of now does raise.
                sensors.publish("larkmoor/cow-shed/dry", dry(36, System.currentTimeMillis()));
                await().atMost(Duration.ofSeconds(10)).until(() -> d.watches().engine().state("hot-shed", "cow-shed") == AlertState.RAISED);
            }
        }
    }
}
