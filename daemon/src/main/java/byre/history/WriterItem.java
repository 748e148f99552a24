package byre.history;

import java.sql.Connection;
import java.sql.SQLException;
import java.util.concurrent.CompletableFuture;

/** Something the writer thread handles in order with the rows: a row, a flush marker, a task, or a wake-up. */
abstract class WriterItem {

    /** One reading: about 32 bytes on the heap (the key is shared). */
    static final class Row extends WriterItem {
        final StreamKey key;
        final long tsMs;
        final double value;
        /** Run once the row is durable (committed), dropped, or the database is failing; null for most rows. */
        Runnable onStored;

        Row(StreamKey key, long tsMs, double value, Runnable onStored) {
            this.key = key;
            this.tsMs = tsMs;
            this.value = value;
            this.onStored = onStored;
        }
    }

    /** Completes once every row taken before it is committed (or dropped), open rollups included. */
    static final class Marker extends WriterItem {
        final CompletableFuture<Void> done = new CompletableFuture<>();
        long target;
    }

    /** Work run on the writer's own connection (tests use it to cap the file size). */
    @FunctionalInterface
    interface ConnectionTask {
        void run(Connection conn) throws SQLException;
    }

    static final class Task extends WriterItem {
        final ConnectionTask work;
        final CompletableFuture<Void> done = new CompletableFuture<>();

        Task(ConnectionTask work) { this.work = work; }
    }

    static final class Wake extends WriterItem {}

    /** Runs a row's callback, which must not stop the writer whatever it throws. */
    static void release(Runnable onStored) {
        if (onStored == null) return;
        try {
            onStored.run();
        } catch (RuntimeException e) {
            org.slf4j.LoggerFactory.getLogger(HistoryWriter.class).warn("acknowledging a stored reading failed: {}", e.toString());
        }
    }
}
