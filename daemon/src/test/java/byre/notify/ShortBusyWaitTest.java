package byre.notify;

import static org.awaitility.Awaitility.await;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import byre.history.HistoryStore;
import byre.time.Ticker;
import java.nio.file.Path;
import java.sql.Connection;
import java.sql.DriverManager;
import java.sql.SQLException;
import java.sql.Statement;
import java.time.Duration;
import java.util.List;
import java.util.concurrent.CompletableFuture;
import java.util.concurrent.TimeUnit;
import java.util.concurrent.atomic.AtomicLong;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/** The outbox waits for the file's write lock with its own short naps, and gives up after the limit by its ticker. */
class ShortBusyWaitTest {
    @TempDir
    Path dir;

    /** Counts how often it is read; each read moves it on by {@code step}. */
    static final class CountingTicker implements Ticker {
        final AtomicLong reads = new AtomicLong();
        final long stepNanos;

        CountingTicker(Duration step) {
            stepNanos = step.toNanos();
        }

        @Override
        public long nanos() {
            return reads.incrementAndGet() * stepNanos;
        }
    }

    @Test
    void anEnqueueWaitsWhileAnotherConnectionWritesAndGoesOnOnceItCommits() throws Exception {
        Path db = dir.resolve("history.db");
        CountingTicker ticker = new CountingTicker(Duration.ZERO);
        try (HistoryStore store = HistoryStore.open(db); Outbox outbox = new Outbox(store.openSyncedConnection(), ticker, null);
             Connection other = DriverManager.getConnection("jdbc:sqlite:" + db); Statement st = other.createStatement()) {
            st.execute("BEGIN IMMEDIATE"); // as the history writer's batch does
            CompletableFuture<Integer> enqueued = CompletableFuture.supplyAsync(() -> {
                try {
                    return outbox.enqueue(List.of(OutboxStateTest.event("ev-1", "night-phone")), OutboxDurabilityTest.T0);
                } catch (SQLException e) {
                    throw new IllegalStateException(e);
                }
            });
            await().atMost(10, TimeUnit.SECONDS).until(() -> ticker.reads.get() >= 2); // waiting, in our busy handler
            assertTrue(!enqueued.isDone(), "no commit while the other connection holds the write lock");
            st.execute("COMMIT");
            assertEquals(1, enqueued.get(10, TimeUnit.SECONDS));
            assertEquals(List.of("ev-1"), OutboxDurabilityTest.column(db, "SELECT id FROM outbox_event"));
        }
    }

    @Test
    void givesUpAfterTheLimitAsBusy() throws Exception {
        Path db = dir.resolve("history.db");
        CountingTicker ticker = new CountingTicker(Duration.ofSeconds(1));
        try (HistoryStore store = HistoryStore.open(db); Outbox outbox = new Outbox(store.openSyncedConnection(), ticker, null);
             Connection other = DriverManager.getConnection("jdbc:sqlite:" + db); Statement st = other.createStatement()) {
            st.execute("BEGIN IMMEDIATE");
            SQLException e = assertThrows(SQLException.class,
                    () -> outbox.enqueue(List.of(OutboxStateTest.event("ev-1", "night-phone")), OutboxDurabilityTest.T0));
            assertTrue(e.getMessage().contains("SQLITE_BUSY"), e.getMessage());
            assertEquals(ShortBusyWait.LIMIT.toSeconds() + 1, ticker.reads.get(), "a try a second by the ticker, until the limit");
            st.execute("ROLLBACK");
        }
    }
}
