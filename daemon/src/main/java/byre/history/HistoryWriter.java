package byre.history;

import byre.rules.ZoneReading;
import byre.time.Ticker;
import java.sql.Connection;
import java.sql.SQLException;
import java.time.Clock;
import java.time.Duration;
import java.time.Instant;
import java.util.concurrent.ArrayBlockingQueue;
import java.util.concurrent.BlockingQueue;
import java.util.concurrent.CompletableFuture;
import java.util.concurrent.ExecutionException;
import java.util.concurrent.TimeUnit;
import java.util.concurrent.TimeoutException;
import java.util.concurrent.atomic.AtomicLong;

/**
 * The single writer of the history: callers {@link #append} readings, one thread ({@link BatchLoop}) commits them
 * in batches (see {@link WriterSettings}: by default every 2 s or 10,000 rows) and, between batches, prunes old
 * rows in small steps. Minute and hour rollups are kept in memory until their bucket closes ({@link OpenRollups});
 * when they are written, the raw rows they cover are packed into runs in the same commit ({@link RunSealer}).
 *
 * <p><b>Back-pressure, not loss.</b> {@code append} puts into a bounded queue; when the queue is full it waits
 * up to {@code appendTimeout} and then gives up, returning false and counting the row in
 * {@link WriterStats#rowsRejected()}. The writer thread empties the queue into its in-memory backlog even while the
 * database is failing, so a full queue means the writer is slow, not broken; blocking the MQTT callback for
 * a moment then holds back QoS 1 acknowledgements, which is the right back-pressure for a broker.
 *
 * <p><b>Write errors</b> (disk full, read-only file, I/O error) never stop the thread: the batch is rolled back,
 * its rows stay in the backlog, {@link WriterStats#healthy()} turns false with {@link WriterStats#lastError()}, and
 * the batch is retried with a doubling delay up to {@code maxRetryDelay}. Ingest goes on into the backlog, which
 * holds at most {@code backlogLimit} rows; beyond that the oldest rows are dropped and counted in
 * {@link WriterStats#rowsDropped()}. When a write succeeds again the backlog is written out in order.
 *
 * <p><b>Duplicates.</b> A reading whose (stream, time) is already stored (an MQTT redelivery) is ignored: the
 * first value is kept and the rollups count it once, because only rows that the insert really added go into
 * the rollups (a reading older than its stream's newest run is looked up in that run first). Readings older than {@code keep-raw} are skipped ({@link WriterStats#rowsTooOld()}): their raw
 * row could already be pruned, so a redelivery would otherwise be counted twice in the rollups.
 */
public final class HistoryWriter implements AutoCloseable {

    private final HistoryStore store;
    private final WriterSettings settings;
    private final BlockingQueue<WriterItem> queue;
    private final BatchLoop loop;
    private final Thread thread;
    private final AtomicLong rowsRejected = new AtomicLong();
    private volatile boolean closing;

    private HistoryWriter(HistoryStore store, WriterSettings settings, BlockingQueue<WriterItem> queue, BatchLoop loop) {
        this.store = store;
        this.settings = settings;
        this.queue = queue;
        this.loop = loop;
        this.thread = new Thread(loop, "history-writer");
        this.thread.setDaemon(true);
    }

    /** Starts a writer with {@link WriterSettings#DEFAULT}. */
    public static HistoryWriter start(HistoryStore store, Retention retention, Clock clock) {
        return start(store, retention, clock, WriterSettings.DEFAULT);
    }

    /**
     * Opens the writer's connection, rebuilds the open rollup buckets, and starts its thread.
     *
     * @throws HistoryException when the database cannot be opened for writing
     */
    public static HistoryWriter start(HistoryStore store, Retention retention, Clock clock, WriterSettings settings) {
        return start(store, retention, clock, settings, Ticker.SYSTEM);
    }

    /** As {@link #start(HistoryStore, Retention, Clock, WriterSettings)}; {@code ticker} times the commit interval, retries and pruning rounds. */
    public static HistoryWriter start(HistoryStore store, Retention retention, Clock clock, WriterSettings settings, Ticker ticker) {
        Connection conn = null;
        try {
            conn = store.openWriterConnection();
            BlockingQueue<WriterItem> queue = new ArrayBlockingQueue<>(settings.queueCapacity());
            HistoryWriter w = new HistoryWriter(store, settings, queue, new BatchLoop(store, retention, clock, ticker, settings, queue, conn));
            w.thread.start();
            return w;
        } catch (SQLException e) {
            HistoryStore.closeQuietly(conn);
            throw new HistoryException("history " + store.path() + ": cannot open for writing: " + e.getMessage(), e);
        }
    }

    /** Queues one zone-level reading; see {@link #append(StreamKey, long, double)}. */
    public boolean append(ZoneReading r) {
        if (r == null || r.at() == null || r.zone() == null || r.quantity() == null) {
            rowsRejected.incrementAndGet();
            return false;
        }
        return append(StreamKey.zone(r.zone(), r.quantity()), r.at().toEpochMilli(), r.value());
    }

    /** Queues one reading; see {@link #append(StreamKey, long, double)}. */
    public boolean append(StreamKey key, Instant at, double value) {
        if (at == null) {
            rowsRejected.incrementAndGet();
            return false;
        }
        return append(key, at.toEpochMilli(), value);
    }

    /**
     * Queues one reading for writing. Waits at most {@code appendTimeout} when the queue is full.
     *
     * @return false (and counts it in {@link WriterStats#rowsRejected()}) when the row was not queued: the writer is
     *     closed, the queue stayed full, or the value is not a finite number
     */
    public boolean append(StreamKey key, long epochMs, double value) {
        return append(key, epochMs, value, null);
    }

    /**
     * Queues one reading and runs {@code onStored} once it is committed: byre acknowledges a QoS 1 message
     * to the broker only then, so a crash loses nothing the broker was told is safe. While the database
     * cannot be written, {@code onStored} runs as soon as the row is held in memory (ingest must go on, and
     * the broker would otherwise stop sending); a row dropped by the backlog bound also releases it.
     * Such rows wait for the next commit like any other (at most {@code commitEvery}).
     */
    public boolean append(StreamKey key, long epochMs, double value, Runnable onStored) {
        return enqueue(key, epochMs, value, onStored, false);
    }

    /**
     * Like {@link #append(StreamKey, long, double, Runnable)}, but waits as long as the queue stays full: the MQTT
     * intake calls this, and waiting there holds back the broker, which keeps the messages, instead of dropping a
     * reading. Gives up only when the writer is closed or its thread has stopped.
     */
    public boolean appendWaiting(StreamKey key, long epochMs, double value, Runnable onStored) {
        return enqueue(key, epochMs, value, onStored, true);
    }

    private boolean enqueue(StreamKey key, long epochMs, double value, Runnable onStored, boolean untilRoom) {
        if (!closing && key != null && Double.isFinite(value)) {
            WriterItem.Row row = new WriterItem.Row(key, epochMs, value, onStored);
            try {
                if (queue.offer(row, settings.appendTimeout().toNanos(), TimeUnit.NANOSECONDS)) return true;
                while (untilRoom && !closing && thread.isAlive()) {
                    if (queue.offer(row, 1, TimeUnit.SECONDS)) return true;
                }
            } catch (InterruptedException e) {
                Thread.currentThread().interrupt();
            }
        }
        rowsRejected.incrementAndGet();
        WriterItem.release(onStored);
        return false;
    }

    /** Waits up to one minute for {@link #flush(Duration)}. */
    public boolean flush() {
        return flush(Duration.ofMinutes(1));
    }

    /**
     * Waits until every row queued before this call is committed (or dropped by the backlog bound), and the rollup
     * buckets held in memory are written: afterwards the database's tables alone hold everything.
     *
     * @return false when that did not happen within {@code timeout} (the database keeps failing) or the writer is stopped
     */
    public boolean flush(Duration timeout) {
        WriterItem.Marker m = new WriterItem.Marker();
        long deadline = System.nanoTime() + timeout.toNanos();
        try {
            if (!thread.isAlive() || !queue.offer(m, timeout.toNanos(), TimeUnit.NANOSECONDS)) return false;
            m.done.get(Math.max(0, deadline - System.nanoTime()), TimeUnit.NANOSECONDS);
            return true;
        } catch (InterruptedException e) {
            Thread.currentThread().interrupt();
            return false;
        } catch (ExecutionException | TimeoutException e) {
            return false;
        }
    }

    /** Asks for a retention round at the next idle moment, without waiting for {@code retentionEvery}. */
    public void requestRetention() {
        loop.retentionRequested = true;
        queue.offer(new WriterItem.Wake());
    }

    /**
     * Flushes (waiting up to {@code timeout}), then stops the thread and closes its connection. Rows still
     * unwritten after that are lost; they are logged and counted in {@link WriterStats#rowsDropped()}. Appends
     * after close are rejected. Does not close the {@link HistoryStore}.
     */
    public void close(Duration timeout) {
        if (closing) return;
        closing = true;
        flush(timeout);
        loop.stop = true;
        queue.offer(new WriterItem.Wake());
        try {
            thread.join(Math.max(1, timeout.toMillis()));
        } catch (InterruptedException e) {
            Thread.currentThread().interrupt();
        }
    }

    /** {@link #close(Duration)} with 30 seconds. */
    @Override
    public void close() {
        close(Duration.ofSeconds(30));
    }

    /** Runs {@code task} on the writer thread with the writer's connection, in order with queued rows. */
    CompletableFuture<Void> runOnWriter(WriterItem.ConnectionTask task) {
        WriterItem.Task t = new WriterItem.Task(task);
        try {
            queue.put(t);
        } catch (InterruptedException e) {
            Thread.currentThread().interrupt();
            t.done.completeExceptionally(e);
        }
        return t.done;
    }

    /** The counters and gauges as they are now. */
    public WriterStats stats() {
        BatchLoop l = loop;
        return new WriterStats(l.healthy, l.lastError, l.rowsWritten, l.rowsDuplicate, l.rowsTooOld, rowsRejected.get(),
            l.rowsDropped, l.batches, l.lastBatchRows, l.lastCommitMillis, queue.size(), l.backlogRows, l.writeErrors,
            l.rollupFlushes, l.openRollupBuckets, l.retentionSteps, l.retentionRounds, l.retentionRowsDeleted,
            l.maxRetentionStepRows, l.rowsSealed, l.sealBehind);
    }

    /** The writer's settings. */
    public WriterSettings settings() { return settings; }

    /** Size of the database file plus its write-ahead log, in bytes. */
    public long databaseSizeBytes() { return store.sizeOnDiskBytes(); }
}
