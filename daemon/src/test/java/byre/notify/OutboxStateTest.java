package byre.notify;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import byre.alerts.AlertEvent;
import byre.alerts.AlertPolicy;
import byre.alerts.IdSource;
import byre.alerts.WatchOutcome;
import byre.history.HistoryStore;
import byre.testing.MutableClock;
import io.micrometer.core.instrument.simple.SimpleMeterRegistry;
import java.net.URI;
import java.nio.file.Path;
import java.sql.Connection;
import java.sql.DriverManager;
import java.sql.SQLException;
import java.sql.Statement;
import java.time.Duration;
import java.util.List;
import java.util.Map;
import java.util.Random;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/** The incident state is committed in the transaction of the events it caused: one commit per alert, both or neither. */
class OutboxStateTest {
    @TempDir
    Path dir;

    AlertService service(HistoryStore store, MutableClock clock, java.util.function.BiConsumer<String, String> saveState) {
        // Port 9 on the loopback: nothing listens; no test here starts the dispatcher.
        Channel hook = new WebhookChannel("night-phone", URI.create("http://127.0.0.1:9/hook"), null, Map.of(), null, Duration.ofSeconds(2));
        return AlertServices.assemble("larkmoor", Map.of("night-phone", hook), Map.of("night-phone", ChannelFactory.Policy.defaults()),
                new Outbox(store.openSyncedConnection()), saveState, store::loadState, clock, new Random(5), IdSource.counting(),
                new SimpleMeterRegistry(), List.of(), Duration.ofDays(1), "byre/larkmoor/ack");
    }

    static AlertEvent event(String id, String channel) {
        return new AlertEvent(id, "inc-1", byre.alerts.EventKind.RAISED, "larkmoor", "calf-chill", "calf-pen-2", "critical",
                "wind-chill", 3.1, "degC", OutboxDurabilityTest.T0, OutboxDurabilityTest.T0, "Cold wind in calf-pen-2", null, List.of(),
                List.of(channel));
    }

    @Test
    void theRaisedIncidentIsStoredByTheOutboxCommitThatHoldsItsEvent() {
        Path db = dir.resolve("history.db");
        MutableClock clock = new MutableClock(OutboxDurabilityTest.T0);
        AlertPolicy policy = AlertPolicy.notifyOnly(List.of("night-phone"));
        try (HistoryStore store = HistoryStore.open(db)) {
            // A state writer that keeps nothing: whatever survives was written by the outbox's own transaction.
            AlertService before = service(store, clock, (k, v) -> {});
            List<AlertEvent> raised = before.accept(OutboxDurabilityTest.outcome(WatchOutcome.Kind.RAISED, "calf-pen-2",
                    OutboxDurabilityTest.T0, policy));
            assertEquals(1, raised.size());
            before.close();
        }
        try (HistoryStore store = HistoryStore.open(db)) {
            String saved = store.loadState(AlertService.STATE_KEY).get(AlertService.STATE_KEY);
            assertTrue(saved != null && saved.contains("calf-pen-2"), "incident state: " + saved);
            AlertService after = service(store, clock, store::putState);
            assertEquals(1, after.book().openIncidents().size(), "restored after the restart");
            assertTrue(after.accept(OutboxDurabilityTest.outcome(WatchOutcome.Kind.RAISED, "calf-pen-2", clock.instant(), policy)).isEmpty(),
                    "the same raise again sends nothing");
            after.close();
        }
    }

    @Test
    void aFailedEnqueueStoresNeitherTheEventsNorTheState() throws Exception {
        Path db = dir.resolve("history.db");
        try (HistoryStore store = HistoryStore.open(db); Outbox outbox = new Outbox(store.openSyncedConnection())) {
            try (Connection c = DriverManager.getConnection("jdbc:sqlite:" + db); Statement st = c.createStatement()) {
                // The delivery rows are written after the state and the event: a failure there must take both back.
                st.execute("CREATE TRIGGER refuse BEFORE INSERT ON outbox_delivery BEGIN SELECT RAISE(ABORT, 'disk is full'); END");
            }
            AlertEvent e = event("ev-1", "night-phone");
            assertThrows(SQLException.class, () -> outbox.enqueue(List.of(e), OutboxDurabilityTest.T0, AlertService.STATE_KEY, "open calf-pen-2"));
            assertNull(store.loadState(AlertService.STATE_KEY).get(AlertService.STATE_KEY));
            assertEquals(List.of(), OutboxDurabilityTest.column(db, "SELECT id FROM outbox_event"));

            try (Connection c = DriverManager.getConnection("jdbc:sqlite:" + db); Statement st = c.createStatement()) {
                st.execute("DROP TRIGGER refuse");
            }
            assertEquals(1, outbox.enqueue(List.of(e), OutboxDurabilityTest.T0, AlertService.STATE_KEY, "open calf-pen-2"));
            assertEquals("open calf-pen-2", store.loadState(AlertService.STATE_KEY).get(AlertService.STATE_KEY));
            assertEquals(List.of("ev-1"), OutboxDurabilityTest.column(db, "SELECT id FROM outbox_event"));
        }
    }
}
