package byre.history;

import static org.awaitility.Awaitility.await;
import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.nio.file.Path;
import java.sql.Connection;
import java.sql.PreparedStatement;
import java.sql.ResultSet;
import java.time.Clock;
import java.time.Duration;
import java.time.Instant;
import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.Random;
import java.util.TreeMap;
import org.junit.jupiter.api.AfterEach;
import org.junit.jupiter.api.BeforeEach;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/**
 * Raw rows packed into runs ({@link RunSealer}) when the rollups are written: readers see exactly what they saw before
 * (the first stored value of a time), late rows and duplicates of packed ones included, across crashes and upgrades.
 * Checked against a map of what was sent, first value kept, recomputed in the test.
 */
class SealingTest {

    static final Instant T0 = Instant.parse("2025-07-14T10:00:00Z");
    static final List<StreamKey> KEYS = List.of(StreamKey.sensor("pen1-dry"), StreamKey.sensor("pen1-rh"),
        StreamKey.zone("calf-barn", byre.units.Quantity.THI));
    static final long KEEP_RAW_MS = Duration.ofDays(14).toMillis();

    @TempDir Path dir;
    HistoryStore store;
    final Map<StreamKey, TreeMap<Long, Double>> truth = new LinkedHashMap<>();
    long inserted;
    long duplicates;

    @BeforeEach
    void open() {
        store = HistoryStore.open(dir.resolve("history.db"), Clock.systemUTC());
        for (StreamKey k : KEYS) truth.put(k, new TreeMap<>());
    }

    @AfterEach
    void close() {
        store.close();
    }

    /**
     * A batch at {@code nowMs}: each stream's readings of the last {@code spanS} seconds at a random pace, a few late
     * readings (some at times already stored, with another value), and a repeat inside the batch.
     */
    BatchInsert.Result batch(BatchInsert insert, long nowMs, long spanS, Random rnd) throws Exception {
        List<WriterItem.Row> rows = new ArrayList<>();
        for (StreamKey k : KEYS) {
            for (long t = nowMs - spanS * 1000; t < nowMs; t += 1000 + rnd.nextInt(20_000)) rows.add(row(k, t, rnd));
            for (int i = rnd.nextInt(4); i > 0; i--) {
                // A time stored already (redelivered with another value), or any time of the last three hours.
                Long again = truth.get(k).floorKey(T0.toEpochMilli() + (long) (rnd.nextDouble() * (nowMs - T0.toEpochMilli())));
                long late = rnd.nextBoolean() && again != null ? again : nowMs - 1000L * rnd.nextInt(3 * 3600);
                rows.add(row(k, late, rnd));
            }
            if (!rows.isEmpty() && rnd.nextInt(3) == 0) {
                WriterItem.Row again = rows.get(rnd.nextInt(rows.size()));
                rows.add(new WriterItem.Row(again.key, again.tsMs, again.value + 1, again.onStored));
            }
        }
        // A redelivered burst comes in any order: the batch sorts by stream and keeps a stream's arrival order.
        java.util.Collections.shuffle(rows, rnd);
        long before = inserted;
        for (WriterItem.Row r : rows) {
            if (truth.get(r.key).putIfAbsent(r.tsMs, r.value) == null) inserted++;
            else duplicates++;
        }
        BatchInsert.Result res = insert.write(rows.iterator(), rows.size(), nowMs, nowMs - KEEP_RAW_MS, false);
        assertEquals(0, res.tooOld());
        // A repeat of a packed reading is found in its run, not stored again (nor counted again in the rollups).
        assertEquals(inserted - before, res.inserted());
        assertEquals(rows.size() - (inserted - before), res.duplicate());
        return res;
    }

    static WriterItem.Row row(StreamKey k, long ts, Random rnd) {
        // No -0.0 here: SQLite stores it in `reading` as 0, so it is 0.0 before and after packing (RunCodecTest has it).
        double v = switch (rnd.nextInt(10)) {
            case 0 -> Math.round(rnd.nextGaussian() * 100) / 10.0;
            case 1 -> rnd.nextGaussian(); // stored as raw doubles
            default -> Math.round(rnd.nextGaussian() * 500 + 2000) / 100.0;
        };
        // A zone row with an acknowledgement goes in with its batch; one without would be held for the rollup write.
        return new WriterItem.Row(k, ts, v, k.kind() == StreamKey.Kind.ZONE ? () -> { } : null);
    }

    /** Everything readers give back equals the truth: raw readings, newest readings and times, and the rollups. */
    void assertReadersSeeTheTruth() {
        assertReadersSeeTheTruth(true);
    }

    void assertReadersSeeTheTruth(boolean rollups) {
        try (HistoryReader r = store.openReader()) {
            for (StreamKey k : KEYS) {
                TreeMap<Long, Double> want = truth.get(k);
                List<HistoryRow> raw = r.raw(k, null, null);
                assertEquals(want.size(), raw.size(), k + " raw count");
                int i = 0;
                for (Map.Entry<Long, Double> e : want.entrySet()) {
                    HistoryRow got = raw.get(i++);
                    assertEquals(e.getKey(), got.at().toEpochMilli(), k + " time");
                    assertEquals(Double.doubleToRawLongBits(e.getValue()), Double.doubleToRawLongBits(got.value()), k + " value at " + e.getKey());
                }
                if (want.isEmpty()) continue;
                // A range starting and ending inside runs.
                long lo = want.firstKey() + (want.lastKey() - want.firstKey()) / 3;
                long hi = want.firstKey() + 2 * (want.lastKey() - want.firstKey()) / 3;
                assertEquals(List.copyOf(want.subMap(lo, hi).keySet()),
                    r.raw(k, Instant.ofEpochMilli(lo), Instant.ofEpochMilli(hi)).stream().map(h -> h.at().toEpochMilli()).toList());
                assertEquals(want.lastKey(), r.latest(k).orElseThrow().at().toEpochMilli());
                assertEquals(Double.doubleToRawLongBits(want.lastEntry().getValue()), Double.doubleToRawLongBits(r.latest(k).orElseThrow().value()));
                long[] newest = want.subMap(lo, hi).keySet().stream().mapToLong(Long::longValue).toArray();
                newest = java.util.Arrays.copyOfRange(newest, Math.max(0, newest.length - 7), newest.length);
                assertArrayEquals(newest, r.latestTimes(k, Instant.ofEpochMilli(lo), Instant.ofEpochMilli(hi), 7));
                if (!rollups) continue;
                RollupAndQueryTest.assertMatches(RollupAndQueryTest.expected(want, 60_000), r.rollups(k, Resolution.MINUTE, null, null), Duration.ofMinutes(1));
                RollupAndQueryTest.assertMatches(RollupAndQueryTest.expected(want, 3_600_000), r.rollups(k, Resolution.HOUR, null, null), Duration.ofHours(1));
            }
            assertEquals(KEYS.size(), r.latest().size());
            List<HistoryRow> merged = new ArrayList<>();
            r.forEachRawInTimeOrder(KEYS, null, null, merged::add);
            assertEquals(truth.values().stream().mapToInt(Map::size).sum(), merged.size());
            for (int i = 1; i < merged.size(); i++) assertFalse(merged.get(i).at().isBefore(merged.get(i - 1).at()), "time order");
        }
        assertEquals(0, StoredReadings.duplicates(store.path()), "no reading stored twice, across the two tables");
        assertRunsWellFormed(store.path());
    }

    /** Runs of a stream never overlap, each says its first and last time and count right and fits in its page. */
    static void assertRunsWellFormed(Path db) {
        try (Connection c = java.sql.DriverManager.getConnection("jdbc:sqlite:" + db);
             PreparedStatement ps = c.prepareStatement("SELECT stream, ts, upto, n, data FROM reading_run ORDER BY stream, ts");
             ResultSet rs = ps.executeQuery()) {
            int stream = -1;
            long upto = Long.MIN_VALUE;
            while (rs.next()) {
                RunCodec.Run run = RunCodec.decode(rs.getBytes(5));
                assertEquals(rs.getLong(2), run.first());
                assertEquals(rs.getLong(3), run.last());
                assertEquals(rs.getInt(4), run.size());
                assertTrue(run.size() <= RunTable.MAX_READINGS);
                assertTrue(rs.getBytes(5).length <= RunTable.MAX_DATA_BYTES || run.size() == 1);
                if (rs.getInt(1) == stream) assertTrue(run.first() > upto, "runs overlap at " + run.first());
                stream = rs.getInt(1);
                upto = run.last();
            }
        } catch (java.sql.SQLException e) {
            throw new AssertionError(e);
        }
    }

    long rowsInReading() {
        return Sql.number(store.path(), "SELECT count(*) FROM reading");
    }

    @Test
    void readersSeeTheSameBeforeAndAfterRowsArePackedLateRowsAndDuplicatesIncluded() throws Exception {
        Random rnd = new Random(5);
        try (Connection conn = store.openWriterConnection()) {
            BatchInsert insert = new BatchInsert(conn);
            long now = T0.toEpochMilli();
            int packings = 0;
            // Four hours of batches every 20 to 200 s, at random: the ten-minute writes fall between them anywhere.
            while (now < T0.toEpochMilli() + 4 * 3_600_000L) {
                now += 20_000 + rnd.nextInt(180_000);
                if (batch(insert, now, 200, rnd).rollupsWritten()) {
                    packings++;
                    // Nothing older than the minute mark is left as a row: it went into runs in the rollups' commit.
                    // (Late rows of the next batches wait as rows for the next such commit.)
                    assertEquals(0, Sql.number(store.path(), "SELECT count(*) FROM reading WHERE ts < (SELECT upto FROM rollup_mark WHERE res = 'minute')"));
                }
                assertReadersSeeTheTruth();
            }
            assertTrue(packings >= 20, "packed " + packings + " times");
            assertTrue(Sql.number(store.path(), "SELECT count(*) FROM reading_run") > 0);
            assertEquals(inserted, StoredReadings.count(store.path()));
            insert.write(List.<WriterItem.Row>of().iterator(), 0, now, now - KEEP_RAW_MS, true);
            assertEquals(0, rowsInReading(), "a flush packs everything");
            assertReadersSeeTheTruth();
        }
    }

    @Test
    void aCrashBetweenWritesLosesNothing() throws Exception {
        Random rnd = new Random(6);
        long now = T0.toEpochMilli();
        for (int life = 0; life < 6; life++) {
            // Each life ends without a flush or a close of the batch insert: as after kill -9, the next start has
            // only what was committed, rebuilds the open rollups from the rows in `reading` and goes on.
            Connection conn = store.openWriterConnection();
            BatchInsert insert = new BatchInsert(conn);
            for (int i = 0; i < 8; i++) {
                now += 30_000 + rnd.nextInt(150_000);
                batch(insert, now, 200, rnd);
            }
            conn.close();
            store.close();
            store = HistoryStore.open(dir.resolve("history.db"), Clock.systemUTC());
            assertReadersSeeTheTruth();
        }
        assertTrue(Sql.number(store.path(), "SELECT count(*) FROM reading_run") > 0);
    }

    @Test
    void aVersionFourHistoryIsPackedInBoundedStepsAndReadsTheSameThroughout() throws Exception {
        Path old = dir.resolve("v4.db");
        long mark = T0.toEpochMilli() + 6 * 3_600_000L;
        try (HistoryStore v4 = HistoryStore.open(old, Clock.systemUTC(), Migrations.ALL.subList(0, 4));
             Connection c = v4.openWriterConnection()) {
            assertEquals(4, v4.schemaVersion());
            c.setAutoCommit(false);
            try (PreparedStatement ps = c.prepareStatement("INSERT INTO stream(id, kind, key) VALUES (?, ?, ?)")) {
                for (int i = 0; i < KEYS.size(); i++) {
                    ps.setInt(1, i + 1);
                    ps.setString(2, KEYS.get(i).kind().dbName());
                    ps.setString(3, KEYS.get(i).name());
                    ps.executeUpdate();
                }
            }
            Random rnd = new Random(8);
            try (PreparedStatement ps = c.prepareStatement("INSERT INTO reading(stream, ts, value) VALUES (?, ?, ?)")) {
                for (int i = 0; i < KEYS.size(); i++) {
                    // Six hours every 10 s, and the newest minutes after the mark that stay rows.
                    for (long t = T0.toEpochMilli(); t < mark + 300_000; t += 10_000) {
                        double v = row(KEYS.get(i), t, rnd).value;
                        ps.setInt(1, i + 1);
                        ps.setLong(2, t);
                        ps.setDouble(3, v);
                        ps.executeUpdate();
                        truth.get(KEYS.get(i)).put(t, v);
                    }
                }
            }
            c.createStatement().execute("UPDATE rollup_mark SET upto = " + mark);
            c.commit();
        }
        store.close();
        store = HistoryStore.open(old, Clock.systemUTC());
        assertEquals(5, store.schemaVersion());
        long rows = rowsInReading();
        long newer = Sql.number(old, "SELECT count(*) FROM reading WHERE ts >= " + mark);
        try (Connection conn = store.openWriterConnection()) {
            BatchInsert insert = new BatchInsert(conn);
            assertTrue(insert.sealBehind(), "a new start looks for rows to pack");
            int steps = 0;
            while (insert.sealBehind()) {
                int moved = insert.sealStep(1000);
                assertTrue(moved <= 1000, "a step moves at most its rows: " + moved);
                steps++;
                assertReadersSeeTheTruth(false); // the test wrote no rollups for its rows
            }
            assertTrue(steps >= (rows - newer) / 1000, steps + " steps");
            assertEquals(newer, rowsInReading(), "rows newer than the mark stay rows (the open rollups are rebuilt from them)");
            assertEquals(rows - newer, insert.rowsSealed());
        }
    }

    @Test
    void theWriterPacksAnUpgradedHistoryBetweenBatches() throws Exception {
        Instant now = T0.plus(Duration.ofHours(3));
        TestClock clock = new TestClock(now);
        store.close();
        store = HistoryStore.open(dir.resolve("history.db"), clock);
        StreamKey k = KEYS.get(0);
        try (Connection conn = store.openWriterConnection()) {
            // Rows as an earlier byre left them: all in `reading`, the marks past them.
            conn.createStatement().execute("INSERT INTO stream(id, kind, key) VALUES (1, 'sensor', '" + k.name() + "')");
            try (PreparedStatement ps = conn.prepareStatement("INSERT INTO reading(stream, ts, value) VALUES (1, ?, ?)")) {
                conn.setAutoCommit(false);
                for (long t = T0.toEpochMilli(); t < now.toEpochMilli() - 3_600_000; t += 1000) {
                    ps.setLong(1, t);
                    ps.setDouble(2, (t / 1000) % 300 / 10.0);
                    ps.executeUpdate();
                    truth.get(k).put(t, (t / 1000) % 300 / 10.0);
                }
                conn.createStatement().execute("UPDATE rollup_mark SET upto = " + (now.toEpochMilli() - 3_600_000));
                conn.commit();
            }
        }
        try (HistoryWriter writer = HistoryWriter.start(store, Retention.DEFAULT, clock)) {
            await().atMost(Duration.ofSeconds(30)).until(() -> !writer.stats().sealPending());
            assertEquals(truth.get(k).size(), writer.stats().rowsSealed());
            writer.append(k, now.toEpochMilli(), 1.5);
            truth.get(k).put(now.toEpochMilli(), 1.5);
            writer.append(k, T0.toEpochMilli() + 1000, 99.0); // stored already, in a run now
            assertTrue(writer.flush());
            assertEquals(1, writer.stats().rowsDuplicate());
        }
        assertEquals(0, rowsInReading(), "the flush wrote every open minute, so packed every row");
        try (HistoryReader r = store.openReader()) {
            assertEquals(truth.get(k).size(), r.raw(k, null, null).size());
            assertEquals(T0.toEpochMilli() + 1000, r.raw(k, T0.plusSeconds(1), T0.plusSeconds(2)).get(0).at().toEpochMilli());
            assertEquals(0.1, r.raw(k, T0.plusSeconds(1), T0.plusSeconds(2)).get(0).value(), "the first stored value stays");
        }
    }
}
