package byre.notify;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import byre.alerts.AlertEvent;
import byre.alerts.EventKind;
import byre.history.HistoryStore;
import byre.history.HistoryWriter;
import byre.history.Retention;
import byre.history.StreamKey;
import byre.history.WriterHooks;
import byre.history.WriterSettings;
import java.nio.file.Path;
import java.sql.Connection;
import java.sql.DriverManager;
import java.sql.ResultSet;
import java.sql.Statement;
import java.time.Clock;
import java.time.ZoneOffset;
import java.util.ArrayList;
import java.util.List;
import java.util.concurrent.CompletableFuture;
import java.util.concurrent.TimeUnit;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/**
 * An alert's commit that waits for the file's write lock goes before the history writer's next transactions
 * ({@code byre.history.WriteTurn}): SQLite's lock is not fair, and the writer, going from one batch to the next within
 * microseconds, would otherwise take it again while the outbox naps, batch after batch. The order of the commits is
 * kept by the file itself: triggers number the alert's event and each batch's new stream as they are inserted.
 */
class AlertCommitGoesFirstTest {
    @TempDir
    Path dir;

    @Test
    void anAlertWaitingForTheLockCommitsBeforeTheWritersQueuedBatches() throws Exception {
        Path db = dir.resolve("history.db");
        try (HistoryStore store = HistoryStore.open(db);
             HistoryWriter writer = HistoryWriter.start(store, Retention.DEFAULT, Clock.fixed(OutboxDurabilityTest.T0, ZoneOffset.UTC),
                     WriterSettings.builder().batchRows(50).build());
             Outbox outbox = new Outbox(store.openSyncedConnection(), store.writeTurn())) {
            try (Connection c = DriverManager.getConnection("jdbc:sqlite:" + db); Statement st = c.createStatement()) {
                st.execute("CREATE TABLE commit_order(what TEXT NOT NULL)");
                st.execute("CREATE TRIGGER alert_order AFTER INSERT ON outbox_event BEGIN INSERT INTO commit_order VALUES ('alert'); END");
                st.execute("CREATE TRIGGER batch_order AFTER INSERT ON stream BEGIN INSERT INTO commit_order VALUES (new.key); END");
            }
            // The writer holds the lock while the alert's commit waits for it; ten batches of 50 rows (one new stream
            // each) queue behind it.
            // It lets go once the alert has waited 20 ms: by then the outbox naps 1 ms between tries, and without its
            // turn it would find the lock taken again by the first batch.
            long[] waitingSince = {0};
            CompletableFuture<Void> held = WriterHooks.holdWriteLockUntil(writer, () -> {
                if (!store.writeTurn().anyWaiting()) return false;
                if (waitingSince[0] == 0) waitingSince[0] = System.nanoTime();
                return System.nanoTime() - waitingSince[0] >= 20_000_000L;
            });
            long t0 = OutboxDurabilityTest.T0.toEpochMilli() - 3_600_000;
            List<String> batches = new ArrayList<>();
            for (int pen = 1; pen <= 10; pen++) {
                batches.add("calf-pen-" + pen + "-dry");
                for (int i = 0; i < 50; i++) writer.append(StreamKey.sensor("calf-pen-" + pen + "-dry"), t0 + i * 1000L, 4.5);
            }
            AlertEvent e = new AlertEvent("ev-1", "inc-1", EventKind.RAISED, "larkmoor", "calf-chill", "calf-pen-2", "critical",
                    "wind-chill", 3.1, "degC", OutboxDurabilityTest.T0, OutboxDurabilityTest.T0, "Cold wind in calf-pen-2", null,
                    List.of(), List.of("night-phone"));
            assertEquals(1, outbox.enqueue(List.of(e), OutboxDurabilityTest.T0, AlertService.STATE_KEY, "open calf-pen-2"));
            held.get(20, TimeUnit.SECONDS);
            assertTrue(writer.flush());
            assertFalse(store.writeTurn().anyWaiting(), "the alert left the line");

            List<String> order = new ArrayList<>();
            try (Connection c = DriverManager.getConnection("jdbc:sqlite:" + db); Statement st = c.createStatement();
                 ResultSet rs = st.executeQuery("SELECT what FROM commit_order ORDER BY rowid")) {
                while (rs.next()) order.add(rs.getString(1));
            }
            List<String> expected = new ArrayList<>(List.of("alert"));
            expected.addAll(batches);
            assertEquals(expected, order);
        }
    }
}
