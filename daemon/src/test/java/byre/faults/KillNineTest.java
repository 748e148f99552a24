package byre.faults;

import static org.awaitility.Awaitility.await;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import byre.history.StoredReadings;
import byre.testing.ByreProcess;
import byre.testing.Mosquitto;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Duration;
import java.util.HashSet;
import java.util.List;
import java.util.Random;
import java.util.Set;
import java.util.TreeSet;
import java.util.UUID;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.Timeout;
import org.junit.jupiter.api.io.TempDir;

/**
 * byre, as its own JVM, is killed with SIGKILL 20 times at random moments (seeded) while sensors publish QoS 1
 * readings with distinct times, and restarted after each kill. Then it is stopped cleanly and the history
 * must pass {@code PRAGMA integrity_check}, and every row seen committed before any kill must still be there.
 *
 * <p>And no reading the broker acknowledged to the sensors may be missing at the end: byre acknowledges a QoS 1
 * message to the broker only after the history has committed it, so the broker still holds (and sends again
 * after the restart) every reading a kill caught in memory.
 */
class KillNineTest {
    static final int KILLS = 20;

    @TempDir
    Path dir;

    @Test
    @Timeout(150)
    void twentyKillsUnderLoadLoseNoCommittedRowAndLeaveASoundDatabase() throws Exception {
        Path db = dir.resolve("history.db");
        Path config = dir.resolve("byre.yaml");
        Random random = new Random(20260714);
        Set<String> seenCommitted = new HashSet<>();
        int killsWithRowsPresent = 0;
        try (Mosquitto m = Mosquitto.start()) {
            String clientId = "byre-kill-" + UUID.randomUUID().toString().substring(0, 8);
            Files.writeString(config, FaultRig.config(m.uri(), clientId, db));
            // byre's persistent session must exist before the sensors publish: the broker keeps nothing
            // for a subscriber it has never seen.
            try (ByreProcess first = ByreProcess.launch(config, List.of())) {
                await().atMost(Duration.ofSeconds(30)).until(() -> first.log().contains("connected to MQTT broker"));
                assertTrue(first.stop(20) == 143 || !first.isAlive());
            }
            try (SensorStream sensors = new SensorStream(m.uri(), System.currentTimeMillis() - 120_000, 250)) {
                for (int k = 0; k < KILLS; k++) {
                    try (ByreProcess byre = ByreProcess.launch(config, List.of())) {
                        // Random moments: from inside JVM start-up and database opening to well into steady ingest.
                        long aliveMs = 300 + random.nextInt(4000);
                        Thread.sleep(aliveMs);
                        if (Files.exists(db)) {
                            Set<String> rows = committedRows(db);
                            seenCommitted.addAll(rows);
                            if (!rows.isEmpty()) killsWithRowsPresent++;
                        }
                        assertTrue(byre.isAlive(), "byre died on its own:\n" + byre.log());
                        byre.kill9();
                        if (System.getProperty("byre.faults.logs") != null) {
                            Files.createDirectories(Path.of(System.getProperty("byre.faults.logs")));
                            Files.writeString(Path.of(System.getProperty("byre.faults.logs"), "kill-" + k + ".log"), byre.log());
                        }
                    }
                }
                // A last, clean run: it must find every committed row and take in the sessions' backlog.
                try (ByreProcess byre = ByreProcess.launch(config, List.of())) {
                    sensors.close();
                    Set<String> acked = sensors.acknowledged();
                    try {
                        // Up first: on a busy machine the JVM can take longer to start than the quiet spell below, which
                        // would then pass before byre had taken in anything.
                        await().atMost(Duration.ofSeconds(60)).pollInterval(Duration.ofMillis(100))
                                .until(() -> byre.log().contains("connected to MQTT broker"));
                        // Until the backlog is in: every committed row found, and no new row for 3 s (> the 2 s commit interval).
                        long[] last = {-1, System.nanoTime()};
                        await().atMost(Duration.ofSeconds(40)).pollInterval(Duration.ofMillis(250)).until(() -> {
                            if (!Files.exists(db)) return false;
                            Set<String> now = committedRows(db);
                            if (now.size() != last[0]) {
                                last[0] = now.size();
                                last[1] = System.nanoTime();
                            }
                            return now.containsAll(seenCommitted) && System.nanoTime() - last[1] > 3_000_000_000L;
                        });
                    } finally {
                        int code = byre.stop(20);
                        // The JVM exits with 128 + 15 after its shutdown hooks on SIGTERM (systemd: SuccessExitStatus=143).
                        assertTrue(code == 0 || code == 143, "clean stop (SIGTERM) exit code " + code + "\n" + byre.log());
                        assertTrue(byre.log().contains("byre stopped"), byre.log());
                    }
                    Set<String> rows = committedRows(db);
                    Set<String> lost = new TreeSet<>(seenCommitted);
                    lost.removeAll(rows);
                    assertEquals(Set.of(), lost, "rows seen committed before a kill and gone afterwards");
                    assertEquals("ok", FaultRig.text(db, "PRAGMA integrity_check"));
                    assertEquals(0, StoredReadings.duplicates(db), "readings stored twice");
                    Set<String> missing = new TreeSet<>(acked);
                    missing.removeAll(rows);
                    System.out.printf("kill -9 x%d: %d readings acknowledged by the broker, %d stored, %d rows seen committed before kills"
                                    + " (all kept), %d acknowledged readings not stored%n",
                            KILLS, acked.size(), rows.size(), seenCommitted.size(), missing.size());
                    // byre acknowledges a reading to the broker only once it is committed, so the broker keeps (and
                    // sends again) whatever a kill caught in memory: nothing the sensors were told is safe is lost.
                    assertEquals(Set.of(), missing, "readings acknowledged to the sensors but never stored");
                }
            }
        }
        assertTrue(killsWithRowsPresent >= KILLS / 4, "a good share of the kills should hit a database that already holds rows: " + killsWithRowsPresent);
    }

    private static Set<String> committedRows(Path db) throws Exception {
        return FaultRig.sensorRows(db);
    }
}
