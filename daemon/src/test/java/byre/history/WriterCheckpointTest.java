package byre.history;

import static org.awaitility.Awaitility.await;
import static org.junit.jupiter.api.Assertions.assertEquals;

import java.nio.file.Files;
import java.nio.file.Path;
import java.sql.Connection;
import java.sql.SQLException;
import java.sql.Statement;
import java.time.Duration;
import java.time.Instant;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/**
 * The alert outbox's connection never checkpoints (an alert's commit must not copy the write-ahead log into the file),
 * so the writer's connection must: after its own commits past the limit, and after a retention interval in which it
 * committed nothing. A checkpoint is seen as the database file growing by the pages copied into it.
 */
class WriterCheckpointTest {

    static final Instant T = Instant.parse("2026-01-20T00:00:00Z");
    static final String MIB = "x".repeat(1 << 20);

    @TempDir Path dir;

    /** A connection that leaves checkpoints to others, as the outbox's does. */
    static Connection noCheckpoints(HistoryStore store) throws SQLException {
        Connection c = store.openSyncedConnection();
        try (Statement st = c.createStatement()) {
            st.execute("PRAGMA wal_autocheckpoint = 0");
        }
        return c;
    }

    /** Commits {@code mib} state values of 1 MiB each, one commit each. */
    static void fill(Connection c, String prefix, int mib) throws SQLException {
        for (int i = 0; i < mib; i++) HistoryStore.writeState(c, prefix + i, MIB, 0);
    }

    @Test
    void aWriterWithNothingToCommitCheckpointsWhatAnotherConnectionLeftInTheLog() throws Exception {
        TestClock clock = new TestClock(T);
        try (HistoryStore store = HistoryStore.open(dir.resolve("history.db"), clock);
             HistoryWriter writer = HistoryWriter.start(store, Retention.DEFAULT, clock,
                 WriterSettings.builder().retention(Duration.ofDays(365), 1000).build());
             Connection outbox = noCheckpoints(store)) {
            await().atMost(Duration.ofSeconds(20)).until(() -> writer.stats().retentionRounds() >= 1); // the round at start
            long before = Files.size(store.path());
            // 20 MiB, past the log's limit of 4000 pages (16 MiB): that connection copies none of it.
            fill(outbox, "big-", 20);
            assertEquals(before, Files.size(store.path()), "the connection without checkpoints copied the log");

            writer.requestRetention();
            await().atMost(Duration.ofSeconds(20)).until(() -> Files.size(store.path()) > before + (16L << 20));
        }
    }

    @Test
    void aWriterThatCommittedSinceTheLastRoundLeavesTheLogToItsLimit() throws Exception {
        TestClock clock = new TestClock(T);
        try (HistoryStore store = HistoryStore.open(dir.resolve("history.db"), clock);
             HistoryWriter writer = HistoryWriter.start(store, Retention.DEFAULT, clock,
                 WriterSettings.builder().retention(Duration.ofDays(365), 1000).build());
             Connection outbox = noCheckpoints(store)) {
            await().atMost(Duration.ofSeconds(20)).until(() -> writer.stats().retentionRounds() >= 1);
            long before = Files.size(store.path());
            fill(outbox, "small-", 2); // far below the limit
            writer.append(StreamKey.sensor("calf-pen-dry"), T, 4.5);
            assertEquals(true, writer.flush());
            long rounds = writer.stats().retentionRounds();
            writer.requestRetention();
            await().atMost(Duration.ofSeconds(20)).until(() -> writer.stats().retentionRounds() > rounds);
            // A checkpoint every round would write each hot page twice as often as the limit allows.
            assertEquals(before, Files.size(store.path()), "checkpointed although the writer committed a batch");
        }
    }
}
