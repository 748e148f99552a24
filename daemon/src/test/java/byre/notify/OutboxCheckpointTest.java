package byre.notify;

import static org.junit.jupiter.api.Assertions.assertEquals;

import byre.alerts.AlertEvent;
import byre.alerts.EventKind;
import byre.history.HistoryStore;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.List;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/**
 * An alert's commit never copies the write-ahead log into the file, whatever the log holds: that copy (up to 16 MiB, and
 * an fsync of the file) would come before the first delivery attempt. The history writer checkpoints instead
 * ({@code byre.history.WriterCheckpointTest}).
 */
class OutboxCheckpointTest {
    @TempDir
    Path dir;

    @Test
    void commitsPastTheLogsLimitLeaveTheFileAsItWas() throws Exception {
        try (HistoryStore store = HistoryStore.open(dir.resolve("history.db"));
             Outbox outbox = new Outbox(store.openSyncedConnection())) {
            long before = Files.size(store.path());
            String mib = "Cold wind in calf-pen-2 ".repeat((1 << 20) / 24);
            // 20 events of 1 MiB each: past the log's limit of 4000 pages (16 MiB), with the incident state in each commit.
            for (int i = 0; i < 20; i++) {
                AlertEvent e = new AlertEvent("ev-" + i, "inc-1", EventKind.RAISED, "larkmoor", "calf-chill", "calf-pen-2",
                        "critical", "wind-chill", 3.1, "degC", OutboxDurabilityTest.T0, OutboxDurabilityTest.T0, mib, null,
                        List.of(), List.of("night-phone"));
                assertEquals(1, outbox.enqueue(List.of(e), OutboxDurabilityTest.T0, AlertService.STATE_KEY, "open calf-pen-2"));
            }
            assertEquals(before, Files.size(store.path()), "an outbox commit checkpointed the log");
            assertEquals(20, outbox.depth(), "every event is committed");
        }
    }
}
