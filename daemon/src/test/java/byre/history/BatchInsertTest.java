package byre.history;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.nio.file.Path;
import java.sql.Connection;
import java.time.Clock;
import java.time.Duration;
import java.time.Instant;
import java.util.ArrayList;
import java.util.HashMap;
import java.util.List;
import java.util.Map;
import java.util.Random;
import java.util.TreeMap;
import org.junit.jupiter.api.AfterEach;
import org.junit.jupiter.api.BeforeEach;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/**
 * The SQL of one batch, called directly on a writer connection (no thread): rollups stay in memory while their
 * minute is open, closed buckets are written later, a crash loses nothing of them, and readers see the open
 * buckets all along. Checked against a recomputation from the raw readings in the test (plain arithmetic).
 */
class BatchInsertTest {

    static final Instant T0 = Instant.parse("2025-07-14T10:00:00Z");
    static final StreamKey DRY = StreamKey.sensor("pen1-dry");
    static final StreamKey RH = StreamKey.sensor("pen1-rh");
    static final long KEEP_RAW_MS = Duration.ofDays(14).toMillis();

    @TempDir Path dir;
    HistoryStore store;
    final Map<StreamKey, TreeMap<Long, Double>> truth = new HashMap<>();

    @BeforeEach
    void open() {
        store = HistoryStore.open(dir.resolve("history.db"), Clock.systemUTC());
        truth.put(DRY, new TreeMap<>());
        truth.put(RH, new TreeMap<>());
    }

    @AfterEach
    void close() {
        store.close();
    }

    /** One batch of readings every 2 s of both streams over [fromS, toS) seconds after T0, committed at reading time. */
    BatchInsert.Result batch(BatchInsert insert, long fromS, long toS, Random rnd) throws Exception {
        List<WriterItem.Row> rows = new ArrayList<>();
        for (long s = fromS; s < toS; s += 2) {
            for (StreamKey k : List.of(DRY, RH)) {
                long ts = T0.toEpochMilli() + s * 1000;
                double v = Math.round(rnd.nextGaussian() * 1000) / 100.0;
                rows.add(new WriterItem.Row(k, ts, v, null));
                truth.get(k).putIfAbsent(ts, v);
            }
        }
        long now = T0.toEpochMilli() + toS * 1000;
        return insert.write(rows.iterator(), rows.size(), now, now - KEEP_RAW_MS, false);
    }

    void assertRollupsMatchTheRawReadings() {
        try (HistoryReader r = store.openReader()) {
            for (StreamKey k : List.of(DRY, RH)) {
                RollupAndQueryTest.assertMatches(RollupAndQueryTest.expected(truth.get(k), 60_000),
                    r.rollups(k, Resolution.MINUTE, null, null), Duration.ofMinutes(1));
                RollupAndQueryTest.assertMatches(RollupAndQueryTest.expected(truth.get(k), 3_600_000),
                    r.rollups(k, Resolution.HOUR, null, null), Duration.ofHours(1));
                // A range that starts and ends inside buckets: whole buckets starting in it.
                Instant from = T0.plusSeconds(90);
                Instant to = T0.plus(Duration.ofMinutes(70)).plusSeconds(1);
                TreeMap<Long, Double> part = new TreeMap<>(truth.get(k).subMap(T0.plusSeconds(120).toEpochMilli(), T0.plus(Duration.ofMinutes(71)).toEpochMilli()));
                RollupAndQueryTest.assertMatches(RollupAndQueryTest.expected(part, 60_000), r.rollups(k, Resolution.MINUTE, from, to), Duration.ofMinutes(1));
            }
        }
    }

    @Test
    void aBatchInsideAnOpenMinuteWritesRawRowsButNoRollupPages() throws Exception {
        try (Connection conn = store.openWriterConnection()) {
            BatchInsert insert = new BatchInsert(conn);
            Random rnd = new Random(1);
            batch(insert, 0, 10, rnd);
            BatchInsert.Result second = batch(insert, 10, 20, rnd);
            assertEquals(10, second.inserted());
            assertFalse(second.rollupsWritten());
            assertEquals(20, StoredReadings.count(store.path()));
            assertEquals(0, Sql.number(store.path(), "SELECT count(*) FROM rollup_minute"), "the open minute is in memory");
            assertEquals(0, Sql.number(store.path(), "SELECT count(*) FROM rollup_hour"));
            assertEquals(2, insert.openRollupBuckets());
            assertRollupsMatchTheRawReadings(); // readers sum the open minute from the raw rows
        }
    }

    @Test
    void closedMinutesAreWrittenOnceAndHoursWhenAllTheirMinutesAre() throws Exception {
        try (Connection conn = store.openWriterConnection()) {
            BatchInsert insert = new BatchInsert(conn);
            Random rnd = new Random(2);
            int flushes = 0;
            // 75 minutes in 2 s batches (a commit every 2 s, as the writer does by default).
            for (long s = 0; s < 75 * 60; s += 2) if (batch(insert, s, s + 2, rnd).rollupsWritten()) flushes++;
            // Closed minutes are written ten at a time, a minute after the tenth is over: at 10:01 (the first only
            // moves the mark of the new file), then 10:11, 10:21, ... 11:11, which writes minutes up to 11:10.
            assertEquals(9, flushes);
            assertEquals(2 * 70, Sql.number(store.path(), "SELECT count(*) FROM rollup_minute"));
            assertEquals(2, Sql.number(store.path(), "SELECT count(*) FROM rollup_hour"), "hour 10:00 is complete, 11:00 is not");
            assertEquals(T0.plus(Duration.ofMinutes(70)).toEpochMilli(), Sql.number(store.path(), "SELECT upto FROM rollup_mark WHERE res = 'minute'"));
            assertEquals(T0.plus(Duration.ofMinutes(60)).toEpochMilli(), Sql.number(store.path(), "SELECT upto FROM rollup_mark WHERE res = 'hour'"));
            assertRollupsMatchTheRawReadings();
        }
    }

    @Test
    void aCrashLosesNoRollupAndLateRowsGoStraightToTheTables() throws Exception {
        Random rnd = new Random(3);
        try (Connection conn = store.openWriterConnection()) {
            BatchInsert insert = new BatchInsert(conn);
            for (long s = 0; s < 62 * 60 + 30; s += 10) batch(insert, s, s + 10, rnd);
            assertTrue(insert.openRollupBuckets() > 0);
        } // a crash: the open buckets were only in memory
        try (Connection conn = store.openWriterConnection()) {
            BatchInsert insert = new BatchInsert(conn);
            assertEquals(2 * 3, insert.openRollupBuckets(), "minutes 60 to 62 (after the mark at 11:00) rebuilt from the raw rows");
            // A redelivery of old readings (kept values: the first wins) and late readings of a closed minute.
            List<WriterItem.Row> late = new ArrayList<>();
            late.add(new WriterItem.Row(DRY, T0.plusSeconds(10).toEpochMilli(), 99.0, null));
            late.add(new WriterItem.Row(DRY, T0.plusSeconds(11).toEpochMilli(), 42.0, null));
            truth.get(DRY).putIfAbsent(T0.plusSeconds(11).toEpochMilli(), 42.0);
            long now = T0.plus(Duration.ofMinutes(63)).toEpochMilli();
            BatchInsert.Result r = insert.write(late.iterator(), late.size(), now, now - KEEP_RAW_MS, false);
            assertEquals(1, r.inserted());
            assertEquals(1, r.duplicate());
            for (long s = 62 * 60 + 30; s < 64 * 60; s += 10) batch(insert, s, s + 10, rnd);
            assertRollupsMatchTheRawReadings();
            // A flush writes every open bucket: the tables alone then hold everything.
            now = T0.plus(Duration.ofMinutes(64)).toEpochMilli();
            assertTrue(insert.write(List.<WriterItem.Row>of().iterator(), 0, now, now - KEEP_RAW_MS, true).rollupsWritten());
            assertEquals(0, insert.openRollupBuckets());
        }
        assertEquals(truth.get(DRY).size() + truth.get(RH).size(), Sql.number(store.path(), "SELECT sum(n) FROM rollup_minute"));
        assertEquals(truth.get(DRY).size() + truth.get(RH).size(), Sql.number(store.path(), "SELECT sum(n) FROM rollup_hour WHERE ts < "
            + T0.plus(Duration.ofHours(1)).toEpochMilli()) + Sql.number(store.path(), "SELECT sum(n) FROM rollup_minute WHERE ts >= "
            + T0.plus(Duration.ofHours(1)).toEpochMilli()));
        assertRollupsMatchTheRawReadings();
    }

    @Test
    void zoneRowsWaitForTheRollupWriteAndAFailedBatchNeitherLosesNorDoublesThem() throws Exception {
        StreamKey thi = StreamKey.zone("calf-barn", byre.units.Quantity.THI);
        try (Connection conn = store.openWriterConnection()) {
            BatchInsert insert = new BatchInsert(conn);
            long t = T0.toEpochMilli() + 90_000; // the first write, at 10:01:30, only moves the new file's marks (to 10:00)
            assertTrue(insert.write(List.<WriterItem.Row>of().iterator(), 0, t, 0, false).rollupsWritten());
            List<WriterItem.Row> zone = new ArrayList<>();
            // A zone row that an acknowledgement waits on (a central site's stream) goes in at once.
            zone.add(new WriterItem.Row(StreamKey.zone("north/calf-barn", byre.units.Quantity.THI), T0.toEpochMilli() + 60_000, 71.0, () -> { }));
            for (int m = 1; m <= 9; m++) zone.add(new WriterItem.Row(thi, T0.toEpochMilli() + m * 60_000L, 70.0 + m, null));
            for (int i = 0; i < zone.size(); i++) {
                long now = T0.toEpochMilli() + 120_000 + i * 30_000L; // 10:02 to 10:06:30: no rollup write due
                assertFalse(insert.write(zone.subList(i, i + 1).iterator(), 1, now, 0, false).rollupsWritten());
            }
            assertEquals(9, insert.heldZoneRows());
            assertEquals(1, StoredReadings.count(store.path()), "only the row with an acknowledgement");
            try (HistoryReader r = store.openReader()) {
                assertEquals(0, r.raw(thi, null, null).size(), "held rows are not in the file yet");
            }
            // A batch that fails (a trigger stands in for a full disk) keeps them held, once.
            conn.createStatement().execute("CREATE TEMP TRIGGER fail BEFORE INSERT ON reading BEGIN SELECT RAISE(ABORT, 'disk is full'); END");
            long due = T0.toEpochMilli() + 11 * 60_000L; // 10:11: minutes up to 10:10 are due
            List<WriterItem.Row> next = List.of(new WriterItem.Row(thi, T0.toEpochMilli() + 10 * 60_000L, 80.0, null));
            assertThrows(java.sql.SQLException.class, () -> insert.write(next.iterator(), 1, due, 0, false));
            assertEquals(9, insert.heldZoneRows(), "the failed batch's row stays in the writer's backlog, not held twice");
            conn.createStatement().execute("DROP TRIGGER fail");
            BatchInsert.Result r = insert.write(next.iterator(), 1, due, 0, false);
            assertTrue(r.rollupsWritten());
            assertEquals(10, r.inserted(), "the nine held rows and the batch's own");
            assertEquals(0, insert.heldZoneRows());
            assertEquals(9, Sql.number(store.path(), "SELECT count(*) FROM rollup_minute WHERE stream = (SELECT id FROM stream WHERE key = 'calf-barn.thi')"),
                "minutes 10:01 to 10:09 written with their rows; 10:10 is still open");
            // A flush writes whatever is held.
            insert.write(List.of(new WriterItem.Row(thi, due + 60_000, 81.0, null)).iterator(), 1, due + 65_000, 0, false);
            assertEquals(1, insert.heldZoneRows());
            insert.write(List.<WriterItem.Row>of().iterator(), 0, due + 66_000, 0, true);
            assertEquals(0, insert.heldZoneRows());
            assertEquals(11, StoredReadings.count(store.path(), "calf-barn.thi"));
        }
    }

    @Test
    void aHistoryFromBeforeTheMarksKeepsItsRollupsAndGoesOnCorrectly() throws Exception {
        Path old = dir.resolve("old.db");
        long last = T0.plus(Duration.ofMinutes(30)).toEpochMilli();
        // Version 2, written as that version did: every row's minute and hour rollups at once.
        try (HistoryStore v2 = HistoryStore.open(old, Clock.systemUTC(), Migrations.ALL.subList(0, 2))) {
            Sql.exec(old, "INSERT INTO stream(id, kind, key) VALUES (1, 'sensor', 'pen1-dry')");
            Sql.exec(old, "INSERT INTO reading VALUES (1, " + T0.toEpochMilli() + ", 10.0), (1, " + last + ", 20.0)");
            Sql.exec(old, "INSERT INTO rollup_minute VALUES (1, " + T0.toEpochMilli() + ", 1, 10, 10, 10), (1, " + last + ", 1, 20, 20, 20)");
            Sql.exec(old, "INSERT INTO rollup_hour VALUES (1, " + T0.toEpochMilli() + ", 2, 10, 20, 30)");
        }
        store.close();
        store = HistoryStore.open(old, Clock.systemUTC());
        assertEquals(T0.plus(Duration.ofHours(1)).toEpochMilli(), Sql.number(old, "SELECT upto FROM rollup_mark WHERE res = 'minute'"));
        assertEquals(T0.plus(Duration.ofHours(1)).toEpochMilli(), Sql.number(old, "SELECT upto FROM rollup_mark WHERE res = 'hour'"));
        truth.get(DRY).put(T0.toEpochMilli(), 10.0);
        truth.get(DRY).put(last, 20.0);
        try (Connection conn = store.openWriterConnection()) {
            BatchInsert insert = new BatchInsert(conn);
            assertEquals(0, insert.openRollupBuckets());
            Random rnd = new Random(4);
            for (long s = 40 * 60; s < 75 * 60; s += 30) batch(insert, s, s + 30, rnd);
        }
        assertRollupsMatchTheRawReadings();
    }
}
