package byre.notify;

import static org.junit.jupiter.api.Assertions.assertEquals;

import byre.alerts.AlertEvent;
import byre.history.HistoryStore;
import java.nio.file.Path;
import java.time.Instant;
import java.util.List;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/** The rate limit's count: delivered messages of one channel in the window, and when the oldest went. */
class OutboxSentTest {
    static final Instant T0 = Instant.parse("2026-01-20T01:00:00Z");

    @TempDir
    Path dir;

    @Test
    void countsOnlyThisChannelsDeliveriesInTheWindow() throws Exception {
        try (HistoryStore store = HistoryStore.open(dir.resolve("history.db")); Outbox outbox = new Outbox(store.openSyncedConnection())) {
            assertEquals(new Outbox.Sent(0, null), outbox.sentSince("night-phone", T0));
            for (int i = 0; i < 4; i++) {
                AlertEvent e = OutboxStateTest.event("ev-" + i, "night-phone");
                outbox.enqueue(List.of(e.to(List.of("night-phone", "barn-siren"))), T0);
            }
            List<Outbox.Row> rows = outbox.pending("night-phone", 10);
            outbox.delivered(rows.get(0), T0.minusSeconds(60)); // before the window
            outbox.delivered(rows.get(1), T0.plusSeconds(60));
            outbox.delivered(rows.get(2), T0.plusSeconds(120));
            outbox.givenUp(rows.get(3), T0.plusSeconds(130), "gave up");
            outbox.delivered(outbox.pending("barn-siren", 10).get(0), T0.plusSeconds(10)); // another channel

            assertEquals(new Outbox.Sent(2, T0.plusSeconds(60)), outbox.sentSince("night-phone", T0));
            assertEquals(new Outbox.Sent(1, T0.plusSeconds(10)), outbox.sentSince("barn-siren", T0));
            assertEquals(new Outbox.Sent(0, null), outbox.sentSince("night-phone", T0.plusSeconds(121)));
        }
    }
}
