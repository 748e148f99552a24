package byre.faults;

import static org.awaitility.Awaitility.await;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import byre.config.ByreConfig;
import byre.daemon.Daemon;
import byre.daemon.Pipeline;
import byre.history.HistoryWriter;
import byre.history.WriterHooks;
import byre.rules.ZoneReading;
import byre.testing.Configs;
import byre.testing.Mosquitto;
import byre.zones.ClimateDeriver;
import io.micrometer.core.instrument.simple.SimpleMeterRegistry;
import java.nio.file.Path;
import java.time.Clock;
import java.time.Duration;
import java.util.Set;
import java.util.TreeSet;
import java.util.UUID;
import java.util.concurrent.atomic.AtomicLong;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.Timeout;
import org.junit.jupiter.api.io.TempDir;

/**
 * The history's disk fills up (the file capped with {@code PRAGMA max_page_count} on the writer's connection;
 * a small loop-mounted filesystem is not available to tests): readings keep flowing through derivation to
 * the zone streams (what the rules will watch), the writer reports itself unhealthy (the state /health will
 * show, gauge {@code byre.history.healthy} = 0), and when space returns the backlog is written in full.
 * A self-alert through the alert channels belongs to the alerts work and is not tested here (TODO).
 */
class DiskFullTest {
    @TempDir
    Path dir;

    @Test
    @Timeout(60)
    void ingestGoesOnWhileTheDiskIsFullAndTheBacklogIsWrittenWhenSpaceReturns() throws Exception {
        Path db = dir.resolve("history.db");
        SimpleMeterRegistry registry = new SimpleMeterRegistry();
        AtomicLong zoneReadings = new AtomicLong();
        try (Mosquitto m = Mosquitto.start()) {
            ByreConfig cfg = Configs.parse("faults.yaml", FaultRig.config(m.uri(), "byre-disk-" + UUID.randomUUID().toString().substring(0, 8), db),
                    dir, n -> null);
            try (Daemon d = Daemon.create(cfg, Clock.systemUTC(), registry).listen(new Pipeline.ZoneListener() {
                @Override
                public void accept(ZoneReading r) {
                    zoneReadings.incrementAndGet();
                }
            }).start(new ClimateDeriver())) {
                await().atMost(Duration.ofSeconds(15)).until(() -> d.link().isConnected());
                HistoryWriter writer = d.history();
                try (SensorStream sensors = new SensorStream(m.uri(), System.currentTimeMillis() - 120_000, 300)) {
                    await().atMost(Duration.ofSeconds(20)).until(() -> writer.stats().rowsWritten() >= 200);
                    WriterHooks.capAtCurrentSize(writer);
                    await().atMost(Duration.ofSeconds(20)).until(() -> !writer.stats().healthy());
                    assertEquals(0.0, registry.get("byre.history.healthy").gauge().value(), "the health gauge says so");
                    assertTrue(writer.stats().lastError().orElse("").contains("full"), writer.stats().lastError().orElse(""));

                    long processedWhenFull = d.processed();
                    long zonesWhenFull = zoneReadings.get();
                    long writtenWhenFull = writer.stats().rowsWritten();
                    await().atMost(Duration.ofSeconds(20)).until(() -> d.processed() >= processedWhenFull + 1000);
                    assertTrue(zoneReadings.get() > zonesWhenFull, "zone streams are still derived while the disk is full");
                    assertFalse(writer.stats().healthy());
                    assertEquals(writtenWhenFull, writer.stats().rowsWritten(), "nothing could be written");
                    assertTrue(writer.stats().backlogRows() > 500, "readings wait in memory: " + writer.stats().backlogRows());

                    WriterHooks.lift(writer);
                    await().atMost(Duration.ofSeconds(40)).until(() -> writer.stats().healthy());
                    sensors.close();
                    Set<String> acked = sensors.acknowledged();
                    await().atMost(Duration.ofSeconds(20)).untilAsserted(() -> {
                        assertTrue(d.flush());
                        Set<String> missing = new TreeSet<>(acked);
                        missing.removeAll(FaultRig.sensorRows(db));
                        assertEquals(Set.of(), missing, "readings taken in while the disk was full");
                    });
                    assertEquals(0, writer.stats().rowsDropped());
                    assertEquals(0, writer.stats().backlogRows());
                }
            }
        }
        assertEquals("ok", FaultRig.text(db, "PRAGMA integrity_check"));
    }
}
