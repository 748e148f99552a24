package byre.faults;

import static org.awaitility.Awaitility.await;
import static org.junit.jupiter.api.Assertions.assertEquals;

import byre.config.ByreConfig;
import byre.daemon.Daemon;
import byre.history.StoredReadings;
import byre.testing.Configs;
import byre.testing.ManualTicker;
import byre.testing.Mosquitto;
import byre.testing.TestPublisher;
import byre.zones.ClimateDeriver;
import io.micrometer.core.instrument.simple.SimpleMeterRegistry;
import java.nio.file.Path;
import java.time.Clock;
import java.time.Duration;
import java.util.UUID;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.Timeout;
import org.junit.jupiter.api.io.TempDir;

/**
 * One sensor goes mad and sends 5,000 readings as fast as it can while the cow shed's sensor reports normally,
 * through mosquitto. The flood gate (off for 30 s after each connection: a session backlog is not a flood) lets
 * through its burst of 1000 and then 50 per second of elapsed time; elapsed time is a hand-moved ticker, which the
 * test moves past the grace period and then holds still, so exactly the burst is stored, the rest is counted as
 * rejected ({@code byre.readings.rejected{reason=flood}}), and every one of the shed's readings is stored. How
 * promptly the shed's readings get through during a flood is wall-clock speed: {@code byre.bench.FloodBench}.
 */
class FloodTest {
    static final int FLOOD = 5000;
    static final int SHED_EVERY = 250;

    @TempDir
    Path dir;

    @Test
    @Timeout(90)
    void aFloodingSensorIsThrottledAndTheOthersGetThrough() throws Exception {
        Path db = dir.resolve("history.db");
        SimpleMeterRegistry registry = new SimpleMeterRegistry();
        ManualTicker ticker = new ManualTicker();
        try (Mosquitto m = Mosquitto.start()) {
            ByreConfig cfg = Configs.parse("faults.yaml", FaultRig.config(m.uri(), "byre-flood-" + UUID.randomUUID().toString().substring(0, 8), db),
                    dir, n -> null);
            try (Daemon d = Daemon.create(cfg, Clock.systemUTC(), ticker, registry).start(new ClimateDeriver());
                 TestPublisher shed = new TestPublisher(m.uri()); TestPublisher mad = new TestPublisher(m.uri())) {
                await().atMost(Duration.ofSeconds(15)).until(() -> d.link().isConnected());
                ticker.advance(Duration.ofSeconds(31)); // past the grace period after the connection
                long t0 = System.currentTimeMillis();
                int shedSent = 0;
                for (int i = 0; i < FLOOD; i++) {
                    // distinct payload times, 1 ms apart, so that every admitted reading is its own row
                    mad.publish("larkmoor/calf-barn/pen1/dry", FaultRig.payload(0, i, t0 - 60_000 + i));
                    if (i % SHED_EVERY == 0) shed.publish("larkmoor/cow-shed/dry", FaultRig.payload(3, shedSent, t0 + shedSent++));
                }
                int shedTotal = shedSent;
                await().atMost(Duration.ofSeconds(30)).until(() ->
                        registry.counter("byre.readings.rejected", "reason", "flood").count() == FLOOD - 1000 && d.flush()
                                && rows(db, "shed-dry") == shedTotal);
                assertEquals(1000, rows(db, "pen1-dry"), "the burst, and no refill while no time passes");
                ticker.advance(Duration.ofSeconds(2));
                for (int i = 0; i < 200; i++) mad.publish("larkmoor/calf-barn/pen1/dry", FaultRig.payload(0, i, t0 - 50_000 + i));
                await().atMost(Duration.ofSeconds(30)).until(() ->
                        registry.counter("byre.readings.rejected", "reason", "flood").count() == FLOOD - 1000 + 100 && d.flush());
                assertEquals(1100, rows(db, "pen1-dry"), "two seconds later: 50 per second more");
                assertEquals(shedTotal, rows(db, "shed-dry"), "the shed's readings all got through");
            }
        }
    }

    static long rows(Path db, String sensor) throws Exception {
        return StoredReadings.count(db, sensor);
    }
}
