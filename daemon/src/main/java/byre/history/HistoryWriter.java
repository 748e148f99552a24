package byre.history;

import byre.rules.ZoneReading;
import java.sql.Connection;
import java.sql.PreparedStatement;
import java.sql.ResultSet;
import java.sql.SQLException;
import java.time.Clock;
import java.time.Duration;
import java.time.Instant;
import java.util.ArrayDeque;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.HashMap;
import java.util.Iterator;
import java.util.List;
import java.util.Map;
import java.util.Optional;
import java.util.concurrent.ArrayBlockingQueue;
import java.util.concurrent.BlockingQueue;
import java.util.concurrent.CompletableFuture;
import java.util.concurrent.ExecutionException;
import java.util.concurrent.TimeUnit;
import java.util.concurrent.TimeoutException;
import java.util.concurrent.atomic.AtomicLong;
import java.util.concurrent.locks.LockSupport;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;

/**
 * The single writer of the history: callers {@link #append} readings, one thread commits them in batches
 * (when {@code batchRows} are waiting or the oldest has waited {@code maxBatchDelay}) and, between batches,
 * prunes old rows in small steps.
 *
 * <p><b>Back-pressure, not loss.</b> {@code append} puts into a bounded queue; when the queue is full it waits
 * up to {@code appendTimeout} and then gives up, returning false and counting the row in
 * {@link #rowsRejected()}. The writer thread empties the queue into its in-memory backlog even while the
 * database is failing, so a full queue means the writer is slow, not broken; blocking the MQTT callback for
 * a moment then holds back QoS 1 acknowledgements, which is the right back-pressure for a broker.
 *
 * <p><b>Write errors</b> (disk full, read-only file, I/O error) never stop the thread: the batch is rolled back,
 * its rows stay in the backlog, {@link #isHealthy()} turns false with {@link #lastError()}, and the batch is
 * retried with a doubling delay up to {@code maxRetryDelay}. Ingest goes on into the backlog, which holds at
 * most {@code backlogLimit} rows; beyond that the oldest rows are dropped and counted in {@link #rowsDropped()}.
 * When a write succeeds again the backlog is written out in order.
 *
 * <p><b>Duplicates.</b> A reading whose (stream, time) is already stored (an MQTT redelivery) is ignored: the
 * first value is kept and the rollups count it once, because only rows that the insert really added go into
 * the rollup accumulator. Readings older than {@code keep-raw} are skipped ({@link #rowsTooOld()}): their raw
 * row could already be pruned, so a redelivery would otherwise be counted twice in the rollups.
 */
public final class HistoryWriter implements AutoCloseable {

    private static final Logger log = LoggerFactory.getLogger(HistoryWriter.class);

    /** Tuning of the writer. {@link #DEFAULT} fits a barn (tens of sensors) with room for bursts. */
    public record Settings(int batchRows, Duration maxBatchDelay, int queueCapacity, Duration appendTimeout,
                           int backlogLimit, Duration retentionEvery, int retentionStepRows, Duration maxRetryDelay,
                           boolean firstBatchAtOnce) {

        /**
         * 10,000 rows or 2 s per batch (a burst is written in large transactions, each touching a stream's rollup
         * buckets once); a 20,000-row queue (about 20 s of a 1000 rows/s burst) with a 1 s append
         * wait; a 200,000-row backlog for database outages (about 8 MB, 11 hours of 50 sensors every 10 s);
         * a retention round every 10 minutes in steps of 5000 rows; retries up to every 30 s.
         */
        public static final Settings DEFAULT = new Settings(10_000, Duration.ofSeconds(2), 20_000, Duration.ofSeconds(1),
            200_000, Duration.ofMinutes(10), 5000, Duration.ofSeconds(30), true);

        public Settings {
            if (batchRows < 1) throw new IllegalArgumentException("history batch rows must be at least 1, got " + batchRows);
            if (queueCapacity < 1) throw new IllegalArgumentException("history queue capacity must be at least 1, got " + queueCapacity);
            if (backlogLimit < batchRows) {
                throw new IllegalArgumentException("history backlog limit (" + backlogLimit + ") must be at least the batch size (" + batchRows + ")");
            }
            if (retentionStepRows < 1) throw new IllegalArgumentException("history retention step must be at least 1 row, got " + retentionStepRows);
            positive("max batch delay", maxBatchDelay);
            positive("retention interval", retentionEvery);
            positive("max retry delay", maxRetryDelay);
            if (appendTimeout == null || appendTimeout.isNegative()) throw new IllegalArgumentException("history append timeout must be zero or positive");
        }

        private static void positive(String what, Duration d) {
            if (d == null || d.isNegative() || d.isZero()) throw new IllegalArgumentException("history " + what + " must be positive, got " + d);
        }

        public Settings withBatch(int rows, Duration maxDelay) {
            return new Settings(rows, maxDelay, queueCapacity, appendTimeout, Math.max(backlogLimit, rows), retentionEvery, retentionStepRows, maxRetryDelay, false);
        }

        public Settings withBacklogLimit(int rows) {
            return new Settings(batchRows, maxBatchDelay, queueCapacity, appendTimeout, rows, retentionEvery, retentionStepRows, maxRetryDelay, firstBatchAtOnce);
        }

        public Settings withRetention(Duration every, int stepRows) {
            return new Settings(batchRows, maxBatchDelay, queueCapacity, appendTimeout, backlogLimit, every, stepRows, maxRetryDelay, firstBatchAtOnce);
        }

        public Settings withMaxRetryDelay(Duration d) {
            return new Settings(batchRows, maxBatchDelay, queueCapacity, appendTimeout, backlogLimit, retentionEvery, retentionStepRows, d, firstBatchAtOnce);
        }
    }

    /** Something the writer thread must handle in order with the rows. */
    private abstract static class Item {}

    /** One reading: about 32 bytes on the heap (the key is shared). */
    private static final class Row extends Item {
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

    /** Completes once every row taken before it is committed (or dropped). */
    private static final class Marker extends Item {
        final CompletableFuture<Void> done = new CompletableFuture<>();
        long target;
    }

    /** Work run on the writer's own connection (tests use it to cap the file size). */
    @FunctionalInterface
    interface ConnectionTask {
        void run(Connection conn) throws SQLException;
    }

    private static final class Task extends Item {
        final ConnectionTask work;
        final CompletableFuture<Void> done = new CompletableFuture<>();

        Task(ConnectionTask work) { this.work = work; }
    }

    private static final class Wake extends Item {}

    private static final long INITIAL_RETRY_NANOS = TimeUnit.MILLISECONDS.toNanos(100);
    /** While a batch fills, the writer looks at its queue this often (a flush waits at most this much longer). */
    private static final long GATHER_NANOS = TimeUnit.MILLISECONDS.toNanos(20);

    private final HistoryStore store;
    private final Retention retention;
    private final Clock clock;
    private final byre.time.Ticker ticker;
    private final Settings settings;
    private final BlockingQueue<Item> queue;
    private final Thread thread;

    // Writer-thread state.
    private Connection conn;
    private final ArrayDeque<Row> backlog = new ArrayDeque<>();
    private final List<Marker> markers = new ArrayList<>();
    private final Map<StreamKey, Integer> streamIds = new HashMap<>();
    private final RetentionPruner pruner;
    private long takenRows;
    private long firstPendingNanos;
    private long nextRetryNanos;
    private long retryDelayNanos = INITIAL_RETRY_NANOS;
    private long nextRetentionNanos;

    private volatile boolean closing;
    private volatile boolean stop;
    private volatile boolean retentionRequested;

    // Counters and gauges, written by the writer thread (or atomically by callers), read by anyone.
    private final AtomicLong rowsRejected = new AtomicLong();
    private volatile boolean healthy = true;
    private volatile String lastError;
    private volatile long rowsWritten;
    private volatile long rowsDuplicate;
    private volatile long rowsTooOld;
    private volatile long rowsDropped;
    private volatile long batches;
    /** Rows in the backlog whose callback waits for their commit. */
    private int pendingCallbacks;
    private volatile long lastBatchRows;
    private volatile long lastCommitMillis;
    private volatile long writeErrors;
    private volatile int backlogRows;
    private volatile long retentionSteps;
    private volatile long retentionRounds;
    private volatile long retentionRowsDeleted;
    private volatile long maxRetentionStepRows;

    private HistoryWriter(HistoryStore store, Retention retention, Clock clock, Settings settings, byre.time.Ticker ticker) {
        this.store = store;
        this.ticker = ticker;
        this.retention = retention;
        this.clock = clock;
        this.settings = settings;
        this.queue = new ArrayBlockingQueue<>(settings.queueCapacity());
        this.pruner = new RetentionPruner(retention, clock, settings.retentionStepRows());
        this.thread = new Thread(this::run, "history-writer");
        this.thread.setDaemon(true);
    }

    /** Starts a writer with {@link Settings#DEFAULT}. */
    public static HistoryWriter start(HistoryStore store, Retention retention, Clock clock) {
        return start(store, retention, clock, Settings.DEFAULT);
    }

    /**
     * Opens the writer's connection and starts its thread.
     *
     * @throws HistoryException when the database cannot be opened for writing
     */
    public static HistoryWriter start(HistoryStore store, Retention retention, Clock clock, Settings settings) {
        return start(store, retention, clock, settings, byre.time.Ticker.SYSTEM);
    }

    /** As {@link #start(HistoryStore, Retention, Clock, Settings)}; {@code ticker} times batch delays, retries and pruning rounds. */
    public static HistoryWriter start(HistoryStore store, Retention retention, Clock clock, Settings settings, byre.time.Ticker ticker) {
        HistoryWriter w = new HistoryWriter(store, retention, clock, settings, ticker);
        try {
            w.conn = store.openWriterConnection();
        } catch (SQLException e) {
            throw new HistoryException("history " + store.path() + ": cannot open for writing: " + e.getMessage(), e);
        }
        w.nextRetentionNanos = ticker.nanos();
        w.thread.start();
        return w;
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
     * @return false (and counts it in {@link #rowsRejected()}) when the row was not queued: the writer is
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
     * Rows with such a callback are committed without waiting for a fuller batch (group commit).
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
            Row row = new Row(key, epochMs, value, onStored);
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
        release(onStored);
        return false;
    }

    private static void release(Runnable onStored) {
        if (onStored == null) return;
        try {
            onStored.run();
        } catch (RuntimeException e) {
            log.warn("acknowledging a stored reading failed: {}", e.toString());
        }
    }

    /** Releases every waiting callback of the backlog (the database is failing: ingest must not stall). */
    private void releaseAll() {
        if (pendingCallbacks == 0) return;
        for (Row r : backlog) {
            if (r.onStored != null) {
                release(r.onStored);
                r.onStored = null;
            }
        }
        pendingCallbacks = 0;
    }

    /** Waits up to one minute for {@link #flush(Duration)}. */
    public boolean flush() {
        return flush(Duration.ofMinutes(1));
    }

    /**
     * Waits until every row queued before this call is committed (or dropped by the backlog bound).
     *
     * @return false when that did not happen within {@code timeout} (the database keeps failing) or the writer is stopped
     */
    public boolean flush(Duration timeout) {
        Marker m = new Marker();
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
        retentionRequested = true;
        queue.offer(new Wake());
    }

    /**
     * Flushes (waiting up to {@code timeout}), then stops the thread and closes its connection. Rows still
     * unwritten after that are lost; they are logged and counted in {@link #rowsDropped()}. Appends after close
     * are rejected. Does not close the {@link HistoryStore}.
     */
    public void close(Duration timeout) {
        if (closing) return;
        closing = true;
        flush(timeout);
        stop = true;
        queue.offer(new Wake());
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
    CompletableFuture<Void> runOnWriter(ConnectionTask task) {
        Task t = new Task(task);
        try {
            queue.put(t);
        } catch (InterruptedException e) {
            Thread.currentThread().interrupt();
            t.done.completeExceptionally(e);
        }
        return t.done;
    }

    // ---- writer thread ----

    private void run() {
        List<Item> drained = new ArrayList<>();
        try {
            while (!(stop && queue.isEmpty())) {
                long wait = waitNanos();
                Item first;
                if (backlog.isEmpty() || wait == 0) {
                    first = queue.poll(wait, TimeUnit.NANOSECONDS);
                } else {
                    // A batch is filling: nap instead of waiting on the queue, which would wake this thread for
                    // every appended row (a context switch each, at thousands of rows a second).
                    LockSupport.parkNanos(Math.min(wait, GATHER_NANOS));
                    first = queue.poll();
                }
                if (first != null) {
                    absorb(first);
                    drained.clear();
                    queue.drainTo(drained, settings.batchRows());
                    for (Item it : drained) absorb(it);
                }
                long now = ticker.nanos();
                if (commitDue(now)) {
                    commitBatch();
                } else if (backlog.isEmpty() || now - firstPendingNanos < settings.maxBatchDelay().toNanos()) {
                    maybePrune(now);
                }
                completeMarkers();
            }
        } catch (InterruptedException e) {
            Thread.currentThread().interrupt();
        } catch (RuntimeException | Error e) {
            log.error("history writer stopped by an unexpected error", e);
            healthy = false;
            lastError = "writer stopped: " + e;
            throw e;
        } finally {
            if (!backlog.isEmpty()) {
                log.error("history {}: {} readings were not written before shutdown (last error: {})", store.path(), backlog.size(), lastError);
                rowsDropped += backlog.size();
                backlog.clear();
                backlogRows = 0;
            }
            for (Marker m : markers) m.done.completeExceptionally(new IllegalStateException("history writer stopped"));
            HistoryStore.closeQuietly(conn);
        }
    }

    private long waitNanos() {
        long now = ticker.nanos();
        if (!backlog.isEmpty()) {
            // The very first batch goes at once: an installer watching the log sees the first stored
            // reading within a second of start, not after a batch delay.
            long due = !healthy ? nextRetryNanos
                : (!markers.isEmpty() || stop || backlog.size() >= settings.batchRows() || firstBatchNow() || pendingCallbacks > 0) ? now
                : firstPendingNanos + settings.maxBatchDelay().toNanos();
            return Math.max(0, due - now);
        }
        if (pruner.active() || retentionRequested) return 0;
        return Math.max(0, Math.min(nextRetentionNanos - now, TimeUnit.SECONDS.toNanos(1)));
    }

    /** DEFAULT commits the very first batch at once; explicit batching ({@code withBatch}) does not. */
    private boolean firstBatchNow() {
        return settings.firstBatchAtOnce() && batches == 0;
    }

    private boolean commitDue(long now) {
        if (backlog.isEmpty() || now < nextRetryNanos) return false;
        return backlog.size() >= settings.batchRows() || !markers.isEmpty() || stop || firstBatchNow() || pendingCallbacks > 0
            || now - firstPendingNanos >= settings.maxBatchDelay().toNanos();
    }

    private void absorb(Item it) {
        if (it instanceof Row r) {
            if (backlog.isEmpty()) firstPendingNanos = ticker.nanos();
            if (backlog.size() >= settings.backlogLimit()) {
                Row dropped = backlog.pollFirst();
                if (dropped.onStored != null) {
                    release(dropped.onStored);
                    pendingCallbacks--;
                }
                rowsDropped++;
                if (rowsDropped == 1 || rowsDropped % 10_000 == 0) {
                    log.warn("history {}: backlog full ({} rows), dropping the oldest readings; {} dropped so far",
                        store.path(), settings.backlogLimit(), rowsDropped);
                }
            }
            if (r.onStored != null) {
                if (healthy) {
                    pendingCallbacks++;
                } else {
                    release(r.onStored);
                    r.onStored = null;
                }
            }
            backlog.addLast(r);
            takenRows++;
            backlogRows = backlog.size();
        } else if (it instanceof Marker m) {
            m.target = takenRows;
            markers.add(m);
        } else if (it instanceof Task t) {
            try {
                t.work.run(conn);
                t.done.complete(null);
            } catch (SQLException | RuntimeException e) {
                t.done.completeExceptionally(e);
            }
        }
    }

    /** A marker is done when no row taken at or before it is still in the backlog. */
    private void completeMarkers() {
        if (markers.isEmpty()) return;
        long oldestPending = backlog.isEmpty() ? Long.MAX_VALUE : takenRows - backlog.size() + 1;
        Iterator<Marker> it = markers.iterator();
        while (it.hasNext()) {
            Marker m = it.next();
            if (m.target < oldestPending) {
                m.done.complete(null);
                it.remove();
            }
        }
    }

    private void commitBatch() {
        int n = Math.min(settings.batchRows(), backlog.size());
        long cutoff = clock.millis() - retention.keepRaw().toMillis();
        long t0 = ticker.nanos();
        Map<StreamKey, Integer> newIds = new HashMap<>();
        int inserted = 0;
        int duplicate = 0;
        int tooOld = 0;
        try {
            WriterTx.begin(conn);
            RollupAccumulator acc = new RollupAccumulator();
            Row[] rows = new Row[n];
            // (stream id << 32 | position): sorted, the batch visits each stream's place in the table once and in
            // time order, which keeps the B-tree work local; a stream's rows keep their arrival order.
            long[] order = new long[n];
            int queued = 0;
            Iterator<Row> it = backlog.iterator();
            for (int i = 0; i < n; i++) {
                Row r = it.next();
                if (r.tsMs < cutoff) {
                    tooOld++;
                    continue;
                }
                rows[queued] = r;
                order[queued] = ((long) streamId(r.key, newIds) << 32) | queued;
                queued++;
            }
            Arrays.sort(order, 0, queued);
            if (queued > 0) {
                try (PreparedStatement ins = conn.prepareStatement("INSERT OR IGNORE INTO reading(stream, ts, value) VALUES (?, ?, ?)")) {
                    for (int i = 0; i < queued; i++) {
                        Row r = rows[(int) order[i]];
                        ins.setInt(1, (int) (order[i] >>> 32));
                        ins.setLong(2, r.tsMs);
                        ins.setDouble(3, r.value);
                        ins.addBatch();
                    }
                    // sqlite-jdbc reports the change count of each statement: 0 means the row was already stored.
                    int[] changes = ins.executeBatch();
                    if (changes.length != queued) throw new SQLException("batch insert reported " + changes.length + " results for " + queued + " rows");
                    for (int i = 0; i < queued; i++) {
                        if (changes[i] == 1) {
                            inserted++;
                            Row r = rows[(int) order[i]];
                            acc.add((int) (order[i] >>> 32), r.tsMs, r.value);
                        } else if (changes[i] == 0) {
                            duplicate++;
                        } else {
                            throw new SQLException("batch insert gave no row count (" + changes[i] + "); cannot keep rollups exact");
                        }
                    }
                }
            }
            acc.writeTo(conn);
            WriterTx.commit(conn);
        } catch (SQLException e) {
            WriterTx.rollbackQuietly(conn);
            onWriteError(e, n);
            return;
        }
        for (int i = 0; i < n; i++) {
            Row r = backlog.pollFirst();
            if (r.onStored != null) {
                release(r.onStored);
                pendingCallbacks--;
            }
        }
        if (!backlog.isEmpty()) firstPendingNanos = Math.min(firstPendingNanos, ticker.nanos());
        backlogRows = backlog.size();
        streamIds.putAll(newIds);
        rowsWritten += inserted;
        rowsDuplicate += duplicate;
        rowsTooOld += tooOld;
        batches++;
        lastBatchRows = n;
        lastCommitMillis = TimeUnit.NANOSECONDS.toMillis(ticker.nanos() - t0);
        if (!healthy) log.info("history {}: writing again, {} readings still waiting", store.path(), backlog.size());
        healthy = true;
        retryDelayNanos = INITIAL_RETRY_NANOS;
        nextRetryNanos = 0;
    }

    /** The id of a stream, creating it in the current transaction; new ids are cached only after commit. */
    private int streamId(StreamKey key, Map<StreamKey, Integer> newIds) throws SQLException {
        Integer id = streamIds.get(key);
        if (id == null) id = newIds.get(key);
        if (id != null) return id;
        try (PreparedStatement ps = conn.prepareStatement("INSERT OR IGNORE INTO stream(kind, key) VALUES (?, ?)")) {
            ps.setString(1, key.kind().dbName());
            ps.setString(2, key.name());
            ps.executeUpdate();
        }
        try (PreparedStatement ps = conn.prepareStatement("SELECT id FROM stream WHERE kind = ? AND key = ?")) {
            ps.setString(1, key.kind().dbName());
            ps.setString(2, key.name());
            try (ResultSet rs = ps.executeQuery()) {
                if (!rs.next()) throw new SQLException("stream " + key + " vanished while being created");
                id = rs.getInt(1);
            }
        }
        newIds.put(key, id);
        return id;
    }

    private void onWriteError(SQLException e, int batchSize) {
        writeErrors++;
        String msg = e.getMessage();
        if (healthy || !msg.equals(lastError)) {
            log.warn("history {}: cannot write {} readings, keeping them in memory and retrying: {}", store.path(), batchSize, msg);
        }
        lastError = msg;
        healthy = false;
        releaseAll();
        nextRetryNanos = ticker.nanos() + retryDelayNanos;
        retryDelayNanos = Math.min(retryDelayNanos * 2, settings.maxRetryDelay().toNanos());
    }

    private void maybePrune(long now) {
        if (!healthy) return;
        try {
            if (!pruner.active()) {
                if (!retentionRequested && now < nextRetentionNanos) return;
                retentionRequested = false;
                nextRetentionNanos = now + settings.retentionEvery().toNanos();
                pruner.begin(conn);
                if (!pruner.active()) {
                    retentionRounds++;
                    return;
                }
            }
            int deleted = pruner.step(conn);
            retentionSteps++;
            retentionRowsDeleted += deleted;
            if (deleted > maxRetentionStepRows) maxRetentionStepRows = deleted;
            if (!pruner.active()) retentionRounds++;
        } catch (SQLException e) {
            // Pruning failures are reported but not retried early: the next round starts from the top.
            writeErrors++;
            lastError = "retention: " + e.getMessage();
            log.warn("history {}: pruning old rows failed: {}", store.path(), e.getMessage());
        }
    }

    // ---- counters and gauges ----

    /** False while writes fail; the rows are kept and retried. */
    public boolean isHealthy() { return healthy; }

    /** The message of the most recent write error, if any (kept after recovery). */
    public Optional<String> lastError() { return Optional.ofNullable(lastError); }

    /** Readings newly stored (duplicates and too-old rows not counted). */
    public long rowsWritten() { return rowsWritten; }

    /** Readings ignored because their (stream, time) was already stored. */
    public long rowsDuplicate() { return rowsDuplicate; }

    /** Readings skipped because they were older than keep-raw when written. */
    public long rowsTooOld() { return rowsTooOld; }

    /** Readings not queued by {@code append}: queue full past the timeout, writer closed, or not a finite value. */
    public long rowsRejected() { return rowsRejected.get(); }

    /** Readings lost: oldest dropped from a full backlog during a database outage, or unwritten at close. */
    public long rowsDropped() { return rowsDropped; }

    /** Committed batches. */
    public long batches() { return batches; }

    /** Rows in the last committed batch. */
    public long lastBatchRows() { return lastBatchRows; }

    /** Time the last committed batch took, from first insert to commit, in milliseconds. */
    public long lastCommitMillis() { return lastCommitMillis; }

    /** Items waiting in the append queue. */
    public int queueDepth() { return queue.size(); }

    /** Readings taken from the queue but not yet committed (grows during a database outage). */
    public int backlogRows() { return backlogRows; }

    /** Failed batch commits and failed retention steps. */
    public long writeErrors() { return writeErrors; }

    /** Size of the database file plus its write-ahead log, in bytes. */
    public long databaseSizeBytes() { return store.sizeOnDiskBytes(); }

    /** Retention steps run (each deletes at most {@code retentionStepRows} rows). */
    public long retentionSteps() { return retentionSteps; }

    /** Completed retention rounds (every table and stream visited). */
    public long retentionRounds() { return retentionRounds; }

    /** Rows deleted by retention in total. */
    public long retentionRowsDeleted() { return retentionRowsDeleted; }

    /** The most rows any one retention step deleted. */
    public long maxRetentionStepRows() { return maxRetentionStepRows; }
}
