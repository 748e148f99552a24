package byre.history;

import java.sql.Connection;
import java.sql.PreparedStatement;
import java.sql.ResultSet;
import java.sql.SQLException;
import java.util.ArrayList;
import java.util.HashMap;
import java.util.Iterator;
import java.util.List;
import java.util.Map;

/**
 * The minute and hour rollups, kept so that a commit does not rewrite rollup pages for every reading.
 *
 * <p>Two marks, stored in {@code rollup_mark} in the same transactions as the rollups they describe, split time:
 * the minute table holds exactly the raw rows older than the minute mark, the hour table exactly those older than
 * the hour mark. Newer rows are summed here, in memory, per minute bucket; once a bucket has been closed for
 * {@link #GRACE_MS} by the clock it is written and the minute mark moves past it, and each hour whose minutes are
 * all written is summed from the minute table. A row older than a mark (a late reading, a redelivery) goes into
 * that table at once, in its batch, as before. After a crash the memory part is rebuilt from the raw rows newer
 * than the minute mark ({@link #load}); {@link HistoryReader} computes the newer buckets the same way.
 *
 * <p>Changes of one batch are staged and become the in-memory state only when {@link #committed()} is called, so
 * a rolled-back batch, whose rows are retried later, is never counted twice.
 */
final class OpenRollups {

    /** A minute bucket is written this long after it ended: readings arrive a little late, or in bursts. */
    static final long GRACE_MS = 60_000;
    /**
     * Closed minute buckets are written together, ten minutes' worth at a time: the rows of a stream's ten buckets
     * then share one page write instead of ten, which is most of what rollups cost an SD card. Readers sum the
     * newer buckets from the raw rows, so nothing waits on this; after a crash they are rebuilt from the raw rows.
     */
    static final long WRITE_EVERY_MS = 10 * 60_000;
    static final String MINUTE_MARK = "minute";
    static final String HOUR_MARK = "hour";

    private record Bucket(int stream, long start) {}

    /** Count, minimum, maximum and sum of some rows: these merge exactly (the mean is taken when read). */
    static final class Agg {
        long n;
        double lo = Double.POSITIVE_INFINITY;
        double hi = Double.NEGATIVE_INFINITY;
        double total;

        void add(double v) {
            n++;
            if (v < lo) lo = v;
            if (v > hi) hi = v;
            total += v;
        }

        void add(Agg o) {
            n += o.n;
            if (o.lo < lo) lo = o.lo;
            if (o.hi > hi) hi = o.hi;
            total += o.total;
        }

        Agg copy() {
            Agg a = new Agg();
            a.add(this);
            return a;
        }
    }

    /** Minute buckets at or after the minute mark, as of the last commit. */
    private final Map<Bucket, Agg> open = new HashMap<>();
    private long minuteMark;
    private long hourMark;

    // The current batch, applied by committed() and dropped by rolledBack().
    private final Map<Bucket, Agg> staged = new HashMap<>();
    private final Map<Bucket, Agg> lateMinutes = new HashMap<>();
    private final Map<Bucket, Agg> lateHours = new HashMap<>();
    private long stagedMinuteMark;
    private long stagedHourMark;
    private boolean stagedFlush;
    // The bucket of the previous row: a batch comes grouped by stream, so most rows skip the map lookup.
    private int lastStream = -1;
    private long lastMinute = Long.MIN_VALUE;
    private Agg lastAgg;

    long minuteMark() { return minuteMark; }

    long hourMark() { return hourMark; }

    /** The minute mark as the current batch leaves it (moved by {@link #write}, not yet committed). */
    long stagedMinuteMark() { return stagedFlush ? stagedMinuteMark : minuteMark; }

    /** Minute buckets held in memory. */
    int openBuckets() { return open.size(); }

    /** Reads the marks and rebuilds the open buckets from the raw rows newer than the minute mark. */
    void load(Connection conn) throws SQLException {
        open.clear();
        rolledBack();
        long[] marks = readMarks(conn);
        minuteMark = marks[0];
        hourMark = marks[1];
        List<Integer> streams = new ArrayList<>();
        try (PreparedStatement ps = conn.prepareStatement("SELECT id FROM stream ORDER BY id"); ResultSet rs = ps.executeQuery()) {
            while (rs.next()) streams.add(rs.getInt(1));
        }
        try (PreparedStatement ps = conn.prepareStatement("SELECT ts, value FROM reading WHERE stream = ? AND ts >= ?")) {
            for (int stream : streams) {
                ps.setInt(1, stream);
                ps.setLong(2, minuteMark);
                try (ResultSet rs = ps.executeQuery()) {
                    while (rs.next()) {
                        open.computeIfAbsent(new Bucket(stream, Resolution.MINUTE.bucketStart(rs.getLong(1))), b -> new Agg()).add(rs.getDouble(2));
                    }
                }
            }
        }
    }

    /** The minute and hour marks of a history ({@code Long.MAX_VALUE} for a file from before the marks: all stored). */
    static long[] readMarks(Connection conn) throws SQLException {
        long[] out = {Long.MAX_VALUE, Long.MAX_VALUE};
        try (PreparedStatement ps = conn.prepareStatement("SELECT res, upto FROM rollup_mark"); ResultSet rs = ps.executeQuery()) {
            while (rs.next()) {
                if (MINUTE_MARK.equals(rs.getString(1))) out[0] = rs.getLong(2);
                if (HOUR_MARK.equals(rs.getString(1))) out[1] = rs.getLong(2);
            }
        } catch (SQLException e) {
            if (e.getMessage() == null || !e.getMessage().contains("no such table")) throw e;
        }
        return out;
    }

    /** Counts one row that the current batch really inserted (not a duplicate). */
    void add(int stream, long tsMs, double value) {
        long minute = Resolution.MINUTE.bucketStart(tsMs);
        if (minute < minuteMark) {
            lateMinutes.computeIfAbsent(new Bucket(stream, minute), b -> new Agg()).add(value);
            if (tsMs < hourMark) lateHours.computeIfAbsent(new Bucket(stream, Resolution.HOUR.bucketStart(tsMs)), b -> new Agg()).add(value);
            return;
        }
        if (stream != lastStream || minute != lastMinute) {
            lastAgg = staged.computeIfAbsent(new Bucket(stream, minute), b -> new Agg());
            lastStream = stream;
            lastMinute = minute;
        }
        lastAgg.add(value);
    }

    /**
     * Writes, in the caller's transaction, the late rows' buckets and every bucket closed by {@code nowMs} (with
     * {@code all}, every bucket: the tables alone then hold everything, as a flush promises), and moves the marks.
     *
     * @return whether closed buckets were written (not counting late rows)
     */
    boolean write(Connection conn, long nowMs, boolean all) throws SQLException {
        upsert(conn, Resolution.MINUTE.table, lateMinutes);
        upsert(conn, Resolution.HOUR.table, lateHours);
        long closeBefore = closeBefore(nowMs);
        if (all) {
            for (Bucket b : open.keySet()) closeBefore = Math.max(closeBefore, b.start() + Resolution.MINUTE.widthMs);
            for (Bucket b : staged.keySet()) closeBefore = Math.max(closeBefore, b.start() + Resolution.MINUTE.widthMs);
        }
        stagedMinuteMark = minuteMark;
        stagedHourMark = hourMark;
        stagedFlush = false;
        if (closeBefore <= minuteMark) return false;
        Map<Bucket, Agg> closing = new HashMap<>();
        for (Map.Entry<Bucket, Agg> e : open.entrySet()) {
            if (e.getKey().start() < closeBefore) closing.put(e.getKey(), e.getValue().copy());
        }
        for (Map.Entry<Bucket, Agg> e : staged.entrySet()) {
            if (e.getKey().start() < closeBefore) closing.computeIfAbsent(e.getKey(), b -> new Agg()).add(e.getValue());
        }
        // Merge rather than insert: a file from before the marks may hold part of the bucket being closed.
        upsert(conn, Resolution.MINUTE.table, closing);
        setMark(conn, MINUTE_MARK, closeBefore);
        long newHourMark = Math.floorDiv(closeBefore, Resolution.HOUR.widthMs) * Resolution.HOUR.widthMs;
        if (newHourMark > hourMark) {
            sumHours(conn, hourMark, newHourMark);
            setMark(conn, HOUR_MARK, newHourMark);
            stagedHourMark = newHourMark;
        }
        stagedMinuteMark = closeBefore;
        stagedFlush = true;
        return true;
    }

    /** Minute buckets before this time are due to be written at {@code nowMs} (a multiple of {@link #WRITE_EVERY_MS}). */
    private static long closeBefore(long nowMs) {
        return Math.floorDiv(nowMs - GRACE_MS, WRITE_EVERY_MS) * WRITE_EVERY_MS;
    }

    /** Whether a write at {@code nowMs} closes buckets: the moment to write whatever else waits for the rollups. */
    boolean writeDue(long nowMs) {
        return closeBefore(nowMs) > minuteMark;
    }

    /** The batch is committed: its rows join the open buckets and the written buckets leave them. */
    void committed() {
        for (Map.Entry<Bucket, Agg> e : staged.entrySet()) {
            Agg a = open.get(e.getKey());
            if (a == null) open.put(e.getKey(), e.getValue());
            else a.add(e.getValue());
        }
        if (stagedFlush) {
            minuteMark = stagedMinuteMark;
            hourMark = stagedHourMark;
            Iterator<Bucket> it = open.keySet().iterator();
            while (it.hasNext()) if (it.next().start() < minuteMark) it.remove();
        }
        clearBatch();
    }

    /** The batch was rolled back: forget what it added. */
    void rolledBack() {
        clearBatch();
    }

    private void clearBatch() {
        staged.clear();
        lateMinutes.clear();
        lateHours.clear();
        stagedFlush = false;
        lastStream = -1;
        lastMinute = Long.MIN_VALUE;
        lastAgg = null;
    }

    /** Hour rows for [from, to) of every stream, summed from its minute rows (all written, see the class comment). */
    private static void sumHours(Connection conn, long from, long to) throws SQLException {
        List<Integer> streams = new ArrayList<>();
        try (PreparedStatement ps = conn.prepareStatement("SELECT id FROM stream"); ResultSet rs = ps.executeQuery()) {
            while (rs.next()) streams.add(rs.getInt(1));
        }
        // One stream at a time, so the (stream, ts) key bounds the scan. The minute rows of such an hour are
        // complete, so they replace whatever a file from before the marks held for it.
        try (PreparedStatement ps = conn.prepareStatement("INSERT INTO rollup_hour(stream, ts, n, lo, hi, total) "
                + "SELECT stream, ts - ((ts % 3600000) + 3600000) % 3600000 AS h, sum(n), min(lo), max(hi), sum(total) "
                + "FROM rollup_minute WHERE stream = ? AND ts >= ? AND ts < ? GROUP BY stream, h "
                + "ON CONFLICT(stream, ts) DO UPDATE SET n = excluded.n, lo = excluded.lo, hi = excluded.hi, total = excluded.total")) {
            for (int stream : streams) {
                ps.setInt(1, stream);
                ps.setLong(2, from);
                ps.setLong(3, to);
                ps.executeUpdate();
            }
        }
    }

    private static void setMark(Connection conn, String res, long upto) throws SQLException {
        try (PreparedStatement ps = conn.prepareStatement(
                "INSERT INTO rollup_mark(res, upto) VALUES (?, ?) ON CONFLICT(res) DO UPDATE SET upto = excluded.upto")) {
            ps.setString(1, res);
            ps.setLong(2, upto);
            ps.executeUpdate();
        }
    }

    private static void upsert(Connection conn, String table, Map<Bucket, Agg> aggs) throws SQLException {
        if (aggs.isEmpty()) return;
        try (PreparedStatement ps = conn.prepareStatement("INSERT INTO " + table + "(stream, ts, n, lo, hi, total) VALUES (?, ?, ?, ?, ?, ?) "
                + "ON CONFLICT(stream, ts) DO UPDATE SET n = n + excluded.n, lo = min(lo, excluded.lo), "
                + "hi = max(hi, excluded.hi), total = total + excluded.total")) {
            // In key order: the pages of the table are visited once each, left to right.
            List<Map.Entry<Bucket, Agg>> sorted = new ArrayList<>(aggs.entrySet());
            sorted.sort((a, b) -> a.getKey().stream() != b.getKey().stream() ? Integer.compare(a.getKey().stream(), b.getKey().stream())
                : Long.compare(a.getKey().start(), b.getKey().start()));
            for (Map.Entry<Bucket, Agg> e : sorted) {
                Agg a = e.getValue();
                ps.setInt(1, e.getKey().stream());
                ps.setLong(2, e.getKey().start());
                ps.setLong(3, a.n);
                ps.setDouble(4, a.lo);
                ps.setDouble(5, a.hi);
                ps.setDouble(6, a.total);
                ps.executeUpdate();
            }
        }
    }
}
