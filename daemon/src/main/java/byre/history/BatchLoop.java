package byre.history;

import byre.time.Ticker;
import java.sql.Connection;
import java.sql.SQLException;
import java.time.Clock;
import java.util.ArrayDeque;
import java.util.ArrayList;
import java.util.Iterator;
import java.util.List;
import java.util.concurrent.BlockingQueue;
import java.util.concurrent.TimeUnit;
import java.util.concurrent.locks.LockSupport;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;

/**
 * The writer thread: takes items from the queue into its backlog, decides when a batch is due, commits it with
 * {@link BatchInsert}, retries failed batches with a doubling delay, and between batches packs raw rows into runs
 * while that is behind (after an upgrade; see {@link RunSealer}) and prunes old rows.
 *
 * <p><b>When a batch is due:</b> {@code batchRows} rows wait; the oldest has waited {@code commitEvery}; a flush or
 * close waits for it; it is the very first batch; or the intake looks stalled with acknowledgements held. The
 * last one: the broker sends at most its in-flight window of unacknowledged messages and then waits, so when at
 * least {@link #STALL_MIN_HELD} acknowledgements are held and nothing arrived for {@link WriterSettings#stallPause()}, the batch
 * goes at once rather than leaving the broker waiting out the interval. Sensors that report in bursts trigger it
 * too, at the end of each burst, which costs nothing extra when bursts are further apart than the interval.
 *
 * <p>Counters are written by this thread only and read by anyone ({@link HistoryWriter#stats()}).
 */
final class BatchLoop implements Runnable {

    private static final Logger log = LoggerFactory.getLogger(HistoryWriter.class);

    private static final long INITIAL_RETRY_NANOS = TimeUnit.MILLISECONDS.toNanos(100);
    /** At most this long the writer lets a waiting alert commit go first (the outbox gives up after as long). */
    private static final long YIELD_LIMIT_NANOS = TimeUnit.MILLISECONDS.toNanos(HistoryStore.BUSY_TIMEOUT_MS);
    private static final long YIELD_NAP_NANOS = TimeUnit.MICROSECONDS.toNanos(100);
    /** While a batch fills, the writer looks at its queue this often (a flush waits at most this much longer). */
    private static final long GATHER_NANOS = TimeUnit.MILLISECONDS.toNanos(20);
    /**
     * Held acknowledgements from which a pause in arrivals commits at once. It must stay below the smallest in-flight
     * window of a broker byre reads: the embedded broker stops sending after 10 unacknowledged messages and
     * mosquitto after 20 unless configured, and with a window at or below this the broker would wait out every
     * commit interval (at 16, a QoS 1 stream through the embedded broker fell to 5 readings a second).
     */
    static final int STALL_MIN_HELD = 8;

    private final HistoryStore store;
    private final Retention retention;
    private final Clock clock;
    private final Ticker ticker;
    private final WriterSettings settings;
    private final BlockingQueue<WriterItem> queue;
    private final Connection conn;
    private final BatchInsert insert;
    private final RetentionPruner pruner;

    private final ArrayDeque<WriterItem.Row> backlog = new ArrayDeque<>();
    private final List<WriterItem.Marker> markers = new ArrayList<>();
    private long takenRows;
    private long firstPendingNanos;
    private long lastArrivalNanos;
    private long nextRetryNanos;
    private long retryDelayNanos = INITIAL_RETRY_NANOS;
    private long nextSealNanos;
    private long sealRetryNanos = INITIAL_RETRY_NANOS;
    private long nextRetentionNanos;
    /** {@link #batches} when the last retention round began. */
    private long batchesAtLastRound = -1;
    /** Rows in the backlog whose callback waits for their commit. */
    private int pendingCallbacks;

    volatile boolean stop;
    volatile boolean retentionRequested;

    volatile boolean healthy = true;
    volatile String lastError;
    volatile long rowsWritten;
    volatile long rowsDuplicate;
    volatile long rowsTooOld;
    volatile long rowsDropped;
    volatile long batches;
    volatile long lastBatchRows;
    volatile long lastCommitMillis;
    volatile long writeErrors;
    volatile int backlogRows;
    volatile long rollupFlushes;
    volatile int openRollupBuckets;
    /** Zone rows the batch insert holds until the rollups are next written. */
    volatile int heldZoneRows;
    volatile long retentionSteps;
    volatile long retentionRounds;
    volatile long retentionRowsDeleted;
    volatile long maxRetentionStepRows;
    volatile long rowsSealed;
    volatile boolean sealBehind;

    BatchLoop(HistoryStore store, Retention retention, Clock clock, Ticker ticker, WriterSettings settings,
              BlockingQueue<WriterItem> queue, Connection conn) throws SQLException {
        this.store = store;
        this.retention = retention;
        this.clock = clock;
        this.ticker = ticker;
        this.settings = settings;
        this.queue = queue;
        this.conn = conn;
        this.insert = new BatchInsert(conn);
        this.pruner = new RetentionPruner(retention, clock, settings.retentionStepRows());
        this.nextRetentionNanos = ticker.nanos();
        this.openRollupBuckets = insert.openRollupBuckets();
        this.heldZoneRows = insert.heldZoneRows();
        this.sealBehind = insert.sealBehind();
    }

    /** Time between the last two rows: shorter than a nap means rows come faster than naps. */
    private long arrivalGapNanos = Long.MAX_VALUE;
    private long gapAverageNanos;
    private static final long ONE_SECOND_NANOS = TimeUnit.SECONDS.toNanos(1);

    @Override
    public void run() {
        List<WriterItem> drained = new ArrayList<>();
        try {
            while (!(stop && queue.isEmpty())) {
                long wait = waitNanos();
                WriterItem first;
                if (backlog.isEmpty() || wait == 0 || arrivalGapNanos >= GATHER_NANOS) {
                    first = queue.poll(wait, TimeUnit.NANOSECONDS);
                } else {
                    // A batch is filling fast: nap instead of waiting on the queue, which would wake this thread for
                    // every appended row (a context switch each, at thousands of rows a second). At barn rates rows
                    // come one at a time, and waiting on the queue wakes the thread less often than napping would.
                    LockSupport.parkNanos(Math.min(wait, GATHER_NANOS));
                    first = queue.poll();
                }
                if (first != null) {
                    absorb(first);
                    drained.clear();
                    queue.drainTo(drained, settings.batchRows());
                    for (WriterItem it : drained) absorb(it);
                }
                long now = ticker.nanos();
                if (commitDue(now)) {
                    commitBatch();
                } else if (backlog.isEmpty() || now - firstPendingNanos < settings.commitEvery().toNanos()) {
                    if (sealDue(now)) sealStep(now);
                    else maybePrune(now);
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
            for (WriterItem.Marker m : markers) m.done.completeExceptionally(new IllegalStateException("history writer stopped"));
            HistoryStore.closeQuietly(conn);
        }
    }

    private long waitNanos() {
        long now = ticker.nanos();
        if (sealDue(now)) return 0; // a packing step runs at once, between batches
        if (!backlog.isEmpty()) {
            long due = !healthy ? nextRetryNanos : commitNow(now) ? now : nextDue();
            return Math.max(0, due - now);
        }
        if (!markers.isEmpty()) return 0;
        if (pruner.active() || retentionRequested) return 0;
        return Math.max(0, Math.min(nextRetentionNanos - now, TimeUnit.SECONDS.toNanos(1)));
    }

    /** The reasons to commit the backlog now, whatever its age. */
    private boolean commitNow(long now) {
        return !markers.isEmpty() || stop || backlog.size() >= settings.batchRows() || firstBatchNow() || stalled(now);
    }

    /** When the backlog is due by age (or by a pause with acknowledgements held). */
    private long nextDue() {
        long due = firstPendingNanos + settings.commitEvery().toNanos();
        if (pendingCallbacks >= STALL_MIN_HELD) due = Math.min(due, lastArrivalNanos + stallPauseNanos());
        return due;
    }

    private boolean stalled(long now) {
        return pendingCallbacks >= STALL_MIN_HELD && now - lastArrivalNanos >= stallPauseNanos();
    }

    /**
     * A pause counts as the broker's window being full only when it is long for the rate rows come at: four times
     * the usual gap, and at least the configured pause. Sensors reporting a few times a second leave gaps longer
     * than 50 ms between readings all the time; without this a light load would commit every 8 readings whatever
     * {@code commit-every} says.
     */
    private long stallPauseNanos() {
        return Math.max(settings.stallPause().toNanos(), Math.min(4 * gapAverageNanos, settings.commitEvery().toNanos()));
    }

    /** The very first batch goes at once (when so configured): an installer watching the log sees the first stored reading. */
    private boolean firstBatchNow() {
        return settings.firstBatchAtOnce() && batches == 0;
    }

    private boolean commitDue(long now) {
        if (now < nextRetryNanos) return false;
        // A flush with nothing left in the backlog still writes the open rollup buckets.
        if (backlog.isEmpty()) return !markers.isEmpty() && (openRollupBuckets > 0 || heldZoneRows > 0) && healthy;
        return commitNow(now) || now - firstPendingNanos >= settings.commitEvery().toNanos();
    }

    private void absorb(WriterItem it) {
        if (it instanceof WriterItem.Row r) {
            long now = ticker.nanos();
            arrivalGapNanos = now - lastArrivalNanos;
            lastArrivalNanos = now;
            // The usual gap between the rows of a batch, smoothed over about eight of them (at most 1 s each).
            if (backlog.isEmpty()) {
                firstPendingNanos = now;
            } else {
                gapAverageNanos += (Math.min(arrivalGapNanos, ONE_SECOND_NANOS) - gapAverageNanos) / 8;
            }
            if (backlog.size() >= settings.backlogLimit()) {
                WriterItem.Row dropped = backlog.pollFirst();
                if (dropped.onStored != null) {
                    WriterItem.release(dropped.onStored);
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
                    WriterItem.release(r.onStored);
                    r.onStored = null;
                }
            }
            backlog.addLast(r);
            takenRows++;
            backlogRows = backlog.size();
        } else if (it instanceof WriterItem.Marker m) {
            m.target = takenRows;
            markers.add(m);
        } else if (it instanceof WriterItem.Task t) {
            try {
                t.work.run(conn);
                t.done.complete(null);
            } catch (SQLException | RuntimeException e) {
                t.done.completeExceptionally(e);
            }
        }
    }

    /** A marker is done when no row taken at or before it is still in the backlog, and no rollup bucket is open. */
    private void completeMarkers() {
        if (markers.isEmpty()) return;
        if (backlog.isEmpty() && (openRollupBuckets > 0 || heldZoneRows > 0) && healthy) return; // the next round writes them
        long oldestPending = backlog.isEmpty() ? Long.MAX_VALUE : takenRows - backlog.size() + 1;
        Iterator<WriterItem.Marker> it = markers.iterator();
        while (it.hasNext()) {
            WriterItem.Marker m = it.next();
            if (m.target < oldestPending) {
                m.done.complete(null);
                it.remove();
            }
        }
    }

    private void commitBatch() {
        int n = Math.min(settings.batchRows(), backlog.size());
        yieldTurn();
        long nowMs = clock.millis();
        long t0 = ticker.nanos();
        BatchInsert.Result result;
        try {
            result = insert.write(backlog.iterator(), n, nowMs, nowMs - retention.keepRaw().toMillis(), !markers.isEmpty() || stop);
        } catch (SQLException e) {
            onWriteError(e, n);
            return;
        }
        for (int i = 0; i < n; i++) {
            WriterItem.Row r = backlog.pollFirst();
            if (r.onStored != null) {
                WriterItem.release(r.onStored);
                pendingCallbacks--;
            }
        }
        long end = ticker.nanos();
        if (!backlog.isEmpty()) firstPendingNanos = Math.min(firstPendingNanos, end);
        backlogRows = backlog.size();
        openRollupBuckets = insert.openRollupBuckets();
        heldZoneRows = insert.heldZoneRows();
        rowsSealed = insert.rowsSealed();
        sealBehind = insert.sealBehind();
        rowsWritten += result.inserted();
        rowsDuplicate += result.duplicate();
        rowsTooOld += result.tooOld();
        if (result.rollupsWritten()) rollupFlushes++;
        batches++;
        lastBatchRows = n;
        lastCommitMillis = TimeUnit.NANOSECONDS.toMillis(end - t0);
        if (!healthy) log.info("history {}: writing again, {} readings still waiting", store.path(), backlog.size());
        healthy = true;
        retryDelayNanos = INITIAL_RETRY_NANOS;
        nextRetryNanos = 0;
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

    /** Releases every waiting callback of the backlog (the database is failing: ingest must not stall). */
    private void releaseAll() {
        if (pendingCallbacks == 0) return;
        for (WriterItem.Row r : backlog) {
            if (r.onStored != null) {
                WriterItem.release(r.onStored);
                r.onStored = null;
            }
        }
        pendingCallbacks = 0;
    }

    /**
     * The alert outbox's connection leaves checkpoints to this one (it must not copy the log on an alert's commit), and
     * this connection checkpoints only after its own commits past the limit. So when no batch was committed since the
     * last retention round (no readings: sensors or broker down), the log is checkpointed here, passively: the outbox's
     * commits cannot grow it without bound. While batches commit, this adds nothing to the writes.
     */
    private void checkpointIfIdle() throws SQLException {
        if (batches == batchesAtLastRound) WriterTx.checkpointPassive(conn);
        batchesAtLastRound = batches;
    }

    /**
     * Before taking the write lock: while an alert's commit waits for it ({@link WriteTurn}), the writer waits, so that
     * the alert does not wait behind this transaction too (and the next, in a burst). Between transactions, so the
     * lock is free for it.
     */
    private void yieldTurn() {
        WriteTurn turn = store.writeTurn();
        if (!turn.anyWaiting()) return;
        long until = ticker.nanos() + YIELD_LIMIT_NANOS;
        while (turn.anyWaiting() && ticker.nanos() - until < 0) LockSupport.parkNanos(YIELD_NAP_NANOS);
    }

    /** Packing raw rows into runs has work left, the database takes writes and no failed step waits to be retried. */
    private boolean sealDue(long now) {
        return sealBehind && healthy && now >= nextSealNanos;
    }

    /** One bounded step of packing raw rows into runs (after an upgrade, or a ten-minute write that had more). */
    private void sealStep(long now) {
        yieldTurn();
        try {
            insert.sealStep(RunSealer.STEP_ROWS);
            sealRetryNanos = INITIAL_RETRY_NANOS;
        } catch (SQLException e) {
            // The rows stay in `reading`, where readers find them too: retry later, with a doubling delay.
            writeErrors++;
            lastError = "packing: " + e.getMessage();
            log.warn("history {}: packing raw readings into runs failed: {}", store.path(), e.getMessage());
            nextSealNanos = now + sealRetryNanos;
            sealRetryNanos = Math.min(sealRetryNanos * 2, settings.maxRetryDelay().toNanos());
        }
        rowsSealed = insert.rowsSealed();
        sealBehind = insert.sealBehind();
    }

    private void maybePrune(long now) {
        if (!healthy) return;
        try {
            if (!pruner.active()) {
                if (!retentionRequested && now < nextRetentionNanos) return;
                retentionRequested = false;
                nextRetentionNanos = now + settings.retentionEvery().toNanos();
                checkpointIfIdle();
                pruner.begin(conn);
                if (!pruner.active()) {
                    retentionRounds++;
                    return;
                }
            }
            yieldTurn();
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
}
