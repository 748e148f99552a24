package byre.history;

import static org.awaitility.Awaitility.await;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import byre.rules.ZoneReading;
import byre.testing.ManualTicker;
import byre.units.Quantity;
import java.nio.file.Path;
import java.time.Duration;
import java.time.Instant;
import java.util.List;
import org.junit.jupiter.api.AfterEach;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

class HistoryWriterTest {

    static final Instant T0 = Instant.parse("2025-07-14T13:00:00Z");
    static final StreamKey PEN1_DRY = StreamKey.sensor("pen1-dry");
    static final StreamKey COWS_THI = StreamKey.zone("cows", Quantity.byId("thi").orElseThrow());

    @TempDir Path dir;
    TestClock clock = new TestClock(T0.plus(Duration.ofHours(1)));
    HistoryStore store;
    HistoryWriter writer;

    HistoryWriter start(WriterSettings settings) {
        store = HistoryStore.open(dir.resolve("history.db"), clock);
        writer = HistoryWriter.start(store, Retention.DEFAULT, clock, settings);
        return writer;
    }

    @AfterEach
    void tearDown() {
        if (writer != null) writer.close();
        if (store != null) store.close();
        if (store != null) assertEquals("ok", Sql.text(store.path(), "PRAGMA integrity_check"));
    }

    @Test
    void writesAndReadsBack() {
        start(WriterSettings.builder().batchRows(1000).commitEvery(Duration.ofSeconds(2)).firstBatchAtOnce(false).build());
        assertTrue(writer.append(PEN1_DRY, T0, 21.5));
        assertTrue(writer.append(PEN1_DRY, T0.plusSeconds(10), 21.75));
        assertTrue(writer.append(new ZoneReading(T0.plusSeconds(10), "cows", COWS_THI.quantity().orElseThrow(), 71.2)));
        assertTrue(writer.flush());
        assertEquals("wal", Sql.text(store.path(), "PRAGMA journal_mode"));
        try (HistoryReader r = store.openReader()) {
            assertEquals(List.of(new HistoryRow(PEN1_DRY, T0, 21.5), new HistoryRow(PEN1_DRY, T0.plusSeconds(10), 21.75)),
                r.raw(PEN1_DRY, T0, T0.plusSeconds(60)));
            assertEquals(List.of(new HistoryRow(PEN1_DRY, T0, 21.5)), r.raw(PEN1_DRY, T0, T0.plusSeconds(10)), "to is exclusive");
            assertEquals(List.of(PEN1_DRY, COWS_THI), r.streams());
            assertEquals("zone:cows.thi", r.streams().get(1).toString());
        }
        assertEquals(3, writer.stats().rowsWritten());
        assertEquals(1, writer.stats().batches());
        assertEquals(3, writer.stats().lastBatchRows());
        assertTrue(writer.databaseSizeBytes() > 0);
    }

    @Test
    void theFirstBatchGoesAtOnceByDefault() {
        // The ticker never moves, so the 2 s batch delay never passes: only the first-batch rule can commit.
        ManualTicker ticker = new ManualTicker();
        store = HistoryStore.open(dir.resolve("history.db"), clock);
        writer = HistoryWriter.start(store, Retention.DEFAULT, clock, WriterSettings.DEFAULT, ticker);
        writer.append(PEN1_DRY, T0, 1.0);
        await().atMost(Duration.ofSeconds(10)).until(() -> writer.stats().rowsWritten() == 1);
    }

    /** Elapsed time for the writer, moved by the test. */
    final ManualTicker ticker = new ManualTicker();

    HistoryWriter startTicking(WriterSettings settings) {
        store = HistoryStore.open(dir.resolve("history.db"), clock);
        writer = HistoryWriter.start(store, Retention.DEFAULT, clock, settings, ticker);
        return writer;
    }

    /** Returns once the writer has gone round its loop after everything queued before (two tasks, in order). */
    void writerWentRound() throws Exception {
        writer.runOnWriter(c -> { }).get();
        writer.runOnWriter(c -> { }).get();
    }

    @Test
    void acknowledgedReadingsWaitForTheCommitIntervalAndAreReleasedByItsCommit() throws Exception {
        startTicking(WriterSettings.builder().commitEvery(Duration.ofSeconds(2)).firstBatchAtOnce(false).build());
        java.util.concurrent.atomic.AtomicInteger acks = new java.util.concurrent.atomic.AtomicInteger();
        for (int i = 0; i < 3; i++) writer.append(PEN1_DRY, T0.plusSeconds(i).toEpochMilli(), i, acks::incrementAndGet);
        writerWentRound(); // taken at time 0
        ticker.advance(Duration.ofMillis(1999));
        writerWentRound();
        assertEquals(0, acks.get(), "not committed, so not acknowledged, before the interval");
        assertEquals(0, writer.stats().batches());
        ticker.advance(Duration.ofMillis(1));
        await().atMost(Duration.ofSeconds(10)).until(() -> acks.get() == 3);
        assertEquals(1, writer.stats().batches(), "one commit for the three readings");
        assertEquals(3, StoredReadings.count(store.path()), "acknowledged only once committed");
    }

    @Test
    void sensorsReportingAFewTimesASecondAreNotMistakenForAFullWindow() throws Exception {
        // 40 sensors every 10 s: a reading every 250 ms. Gaps of 250 ms are the load's own rhythm, not a stalled broker.
        startTicking(WriterSettings.builder().commitEvery(Duration.ofSeconds(2)).firstBatchAtOnce(false).build());
        java.util.concurrent.atomic.AtomicInteger acks = new java.util.concurrent.atomic.AtomicInteger();
        for (int i = 0; i < 7; i++) {
            writer.append(PEN1_DRY, T0.plusSeconds(i).toEpochMilli(), i, acks::incrementAndGet);
            writerWentRound();
            ticker.advance(Duration.ofMillis(250));
            writerWentRound();
        }
        assertEquals(0, acks.get(), "1.75 s: neither the interval nor a stall");
        writer.append(PEN1_DRY, T0.plusSeconds(7).toEpochMilli(), 7, acks::incrementAndGet);
        writerWentRound();
        ticker.advance(Duration.ofMillis(240));
        writerWentRound();
        assertEquals(0, acks.get(), "eight held and a usual gap: still waiting for the interval");
        ticker.advance(Duration.ofMillis(10));
        await().atMost(Duration.ofSeconds(10)).until(() -> acks.get() == 8);
        assertEquals(1, writer.stats().batches(), "one commit, at the interval");
    }

    @Test
    void aPauseWithManyAcknowledgementsHeldCommitsAtOnce() throws Exception {
        // The broker stops sending when its in-flight window is full of unacknowledged messages: do not wait 2 s.
        startTicking(WriterSettings.builder().commitEvery(Duration.ofSeconds(2)).firstBatchAtOnce(false).build());
        java.util.concurrent.atomic.AtomicInteger acks = new java.util.concurrent.atomic.AtomicInteger();
        for (int i = 0; i < BatchLoop.STALL_MIN_HELD - 1; i++) writer.append(PEN1_DRY, T0.plusSeconds(i).toEpochMilli(), i, acks::incrementAndGet);
        writerWentRound();
        ticker.advance(WriterSettings.DEFAULT.stallPause());
        writerWentRound();
        assertEquals(0, acks.get(), "too few held to be a full window");
        writer.append(PEN1_DRY, T0.plusSeconds(100).toEpochMilli(), 1.0, acks::incrementAndGet);
        writerWentRound();
        ticker.advance(WriterSettings.DEFAULT.stallPause().minusNanos(1));
        writerWentRound();
        assertEquals(0, acks.get(), "still arriving");
        ticker.advance(Duration.ofNanos(1));
        await().atMost(Duration.ofSeconds(10)).until(() -> acks.get() == BatchLoop.STALL_MIN_HELD);
        assertEquals(1, writer.stats().batches());
    }

    @Test
    void commitsABatchWhenItHoldsBatchRows() {
        // A 1-hour delay: only the row count can trigger these commits.
        start(WriterSettings.builder().batchRows(100).commitEvery(Duration.ofHours(1)).firstBatchAtOnce(false).build());
        for (int i = 0; i < 250; i++) writer.append(PEN1_DRY, T0.plusSeconds(i), i);
        await().atMost(Duration.ofSeconds(10)).until(() -> writer.stats().batches() == 2);
        assertEquals(200, writer.stats().rowsWritten());
        assertEquals(100, writer.stats().lastBatchRows());
        assertEquals(50, writer.stats().backlogRows(), "the rest waits for the next trigger");
        assertEquals(200, StoredReadings.count(store.path()));
        assertTrue(writer.flush());
        assertEquals(250, writer.stats().rowsWritten());
    }

    @Test
    void commitsAPartialBatchWhenTheOldestRowHasWaitedLongEnough() {
        // 1000 rows would never be reached, and an hour of real time does not pass here: only the delay, on the
        // hand-moved ticker, can trigger this commit.
        ManualTicker ticker = new ManualTicker();
        store = HistoryStore.open(dir.resolve("history.db"), clock);
        writer = HistoryWriter.start(store, Retention.DEFAULT, clock, WriterSettings.builder().batchRows(1000).commitEvery(Duration.ofHours(1)).firstBatchAtOnce(false).build(), ticker);
        for (int i = 0; i < 5; i++) writer.append(PEN1_DRY, T0.plusSeconds(i), i);
        await().atMost(Duration.ofSeconds(10)).until(() -> writer.stats().backlogRows() == 5); // taken by the writer: the delay runs
        ticker.advance(Duration.ofMinutes(59));
        assertEquals(0, writer.stats().rowsWritten());
        ticker.advance(Duration.ofMinutes(1));
        await().atMost(Duration.ofSeconds(10)).until(() -> writer.stats().rowsWritten() == 5);
        assertEquals(1, writer.stats().batches());
        assertEquals(5, StoredReadings.count(store.path()));
    }

    @Test
    void redeliveredReadingsAreStoredOnceAndCountedOnceInTheRollups() {
        start(WriterSettings.builder().batchRows(3).commitEvery(Duration.ofHours(1)).firstBatchAtOnce(false).build());
        writer.append(PEN1_DRY, T0, 10.0);
        writer.append(PEN1_DRY, T0.plusSeconds(10), 20.0);
        writer.append(PEN1_DRY, T0.plusSeconds(10), 99.0); // duplicate inside the same batch
        assertTrue(writer.flush());
        writer.append(PEN1_DRY, T0, 50.0);                  // redelivery in a later batch
        writer.append(PEN1_DRY, T0.plusSeconds(20), 30.0);
        assertTrue(writer.flush());
        assertEquals(3, writer.stats().rowsWritten());
        assertEquals(2, writer.stats().rowsDuplicate());
        try (HistoryReader r = store.openReader()) {
            assertEquals(List.of(10.0, 20.0, 30.0), r.raw(PEN1_DRY, null, null).stream().map(HistoryRow::value).toList(),
                "the first value of a (stream, time) is kept");
            // Mean of 10, 20, 30 is 20 (arithmetic).
            assertEquals(List.of(new RollupRow(PEN1_DRY, T0, Duration.ofMinutes(1), 10.0, 30.0, 20.0, 3)),
                r.rollups(PEN1_DRY, Resolution.MINUTE, null, null));
            assertEquals(List.of(new RollupRow(PEN1_DRY, T0, Duration.ofHours(1), 10.0, 30.0, 20.0, 3)),
                r.rollups(PEN1_DRY, Resolution.HOUR, null, null));
        }
    }

    @Test
    void interleavedStreamsInOneBatchKeepEachStreamsFirstValue() {
        // The writer sorts a batch by stream before inserting; arrival order must still decide which duplicate wins.
        StreamKey wet = StreamKey.sensor("pen1-wet");
        start(WriterSettings.builder().batchRows(6).commitEvery(Duration.ofHours(1)).firstBatchAtOnce(false).build());
        writer.append(wet, T0.plusSeconds(5), 7.0);
        writer.append(PEN1_DRY, T0.plusSeconds(5), 20.0);
        writer.append(wet, T0, 6.0);
        writer.append(PEN1_DRY, T0.plusSeconds(5), 99.0);
        writer.append(wet, T0.plusSeconds(5), 98.0);
        writer.append(PEN1_DRY, T0, 10.0);
        assertTrue(writer.flush());
        assertEquals(4, writer.stats().rowsWritten());
        assertEquals(2, writer.stats().rowsDuplicate());
        try (HistoryReader r = store.openReader()) {
            assertEquals(List.of(10.0, 20.0), r.raw(PEN1_DRY, null, null).stream().map(HistoryRow::value).toList());
            assertEquals(List.of(6.0, 7.0), r.raw(wet, null, null).stream().map(HistoryRow::value).toList());
            assertEquals(List.of(new RollupRow(wet, T0, Duration.ofMinutes(1), 6.0, 7.0, 6.5, 2)),
                r.rollups(wet, Resolution.MINUTE, null, null));
        }
    }

    @Test
    void rejectsValuesThatAreNotFiniteAndReadingsOlderThanKeepRaw() {
        start(WriterSettings.DEFAULT);
        assertFalse(writer.append(PEN1_DRY, T0, Double.NaN));
        assertFalse(writer.append(PEN1_DRY, T0, Double.POSITIVE_INFINITY));
        assertFalse(writer.append(null, T0, 1.0));
        assertEquals(3, writer.stats().rowsRejected());
        writer.append(PEN1_DRY, clock.instant().minus(Duration.ofDays(15)), 1.0);
        writer.append(PEN1_DRY, clock.instant().minus(Duration.ofDays(13)), 2.0);
        assertTrue(writer.flush());
        assertEquals(1, writer.stats().rowsTooOld());
        assertEquals(1, writer.stats().rowsWritten());
        assertTrue(writer.stats().healthy());
    }

    @Test
    void appendAfterCloseIsRejectedAndCloseFlushes() {
        start(WriterSettings.builder().batchRows(1000).commitEvery(Duration.ofHours(1)).firstBatchAtOnce(false).build());
        writer.append(PEN1_DRY, T0, 1.0);
        writer.close();
        assertEquals(1, StoredReadings.count(store.path()));
        assertFalse(writer.append(PEN1_DRY, T0.plusSeconds(1), 2.0));
        assertEquals(1, writer.stats().rowsRejected());
    }

    @Test
    void aFullDiskMakesTheWriterUnhealthyKeepsTheRowsAndWritesThemWhenSpaceReturns() throws Exception {
        start(WriterSettings.builder().batchRows(500).commitEvery(Duration.ofMillis(50)).firstBatchAtOnce(false).maxRetryDelay(Duration.ofMillis(200)).build());
        writer.append(PEN1_DRY, T0, 0.0);
        assertTrue(writer.flush());
        // Cap the file at its current size: the next pages cannot be allocated (SQLITE_FULL).
        WriterHooks.capAtCurrentSize(writer);
        int rows = 20_000;
        for (int i = 1; i <= rows; i++) assertTrue(writer.append(PEN1_DRY, T0.plusSeconds(i), i));
        await().atMost(Duration.ofSeconds(20)).until(() -> !writer.stats().healthy());
        assertTrue(writer.stats().lastError().orElseThrow().contains("full"), writer.stats().lastError().orElseThrow());
        assertTrue(writer.stats().writeErrors() >= 1);
        await().atMost(Duration.ofSeconds(20)).until(() -> writer.stats().queueDepth() == 0);
        assertTrue(writer.stats().backlogRows() > 0, "rows are kept in memory");
        long storedWhileFull = StoredReadings.count(store.path());
        assertTrue(storedWhileFull < rows + 1);
        assertEquals(0, writer.stats().rowsDropped());

        WriterHooks.lift(writer);
        await().atMost(Duration.ofSeconds(20)).until(() -> writer.stats().healthy());
        assertTrue(writer.flush());
        assertEquals(rows + 1, StoredReadings.count(store.path()));
        assertEquals(rows + 1, Sql.number(store.path(), "SELECT sum(n) FROM rollup_minute"), "no batch counted twice by the retries");
        assertEquals(0, writer.stats().backlogRows());
    }

    @Test
    void aBacklogBeyondItsBoundDropsTheOldestRowsAndCountsThem() throws Exception {
        start(WriterSettings.builder().batchRows(100).commitEvery(Duration.ofMillis(50)).firstBatchAtOnce(false).backlogLimit(1000).maxRetryDelay(Duration.ofMillis(200)).build());
        writer.append(PEN1_DRY, T0, 0.0);
        assertTrue(writer.flush());
        WriterHooks.capAtCurrentSize(writer);
        // Enough rows that a batch needs new pages, then more than the backlog holds.
        for (int i = 1; i <= 3000; i++) writer.append(PEN1_DRY, T0.plusSeconds(i), i);
        await().atMost(Duration.ofSeconds(20)).until(() -> writer.stats().queueDepth() == 0 && writer.stats().rowsDropped() > 0);
        assertFalse(writer.stats().healthy());
        assertTrue(writer.stats().backlogRows() <= 1000);
        WriterHooks.lift(writer);
        assertTrue(writer.flush(Duration.ofSeconds(20)));
        long stored = StoredReadings.count(store.path());
        assertEquals(3001, stored + writer.stats().rowsDropped(), "every row is either stored or counted as dropped");
        // The newest rows survive: it is the oldest that are dropped.
        assertEquals(T0.plusSeconds(3000).toEpochMilli(), StoredReadings.maxTs(store.path()).orElseThrow());
    }
}
