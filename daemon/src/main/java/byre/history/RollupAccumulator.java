package byre.history;

import java.sql.Connection;
import java.sql.PreparedStatement;
import java.sql.SQLException;
import java.util.HashMap;
import java.util.Map;

/**
 * Collects the minute and hour summaries of the rows newly inserted by one batch, then merges them into the
 * rollup tables with one upsert per touched bucket, in the batch's own transaction: rollups follow the raw
 * rows without rescanning them, and a rolled-back batch leaves no trace in either.
 */
final class RollupAccumulator {

    private record Bucket(int stream, long start) {}

    private static final class Agg {
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
    }

    private final Map<Bucket, Agg> minutes = new HashMap<>();
    private final Map<Bucket, Agg> hours = new HashMap<>();

    // The buckets of the previous row: rows come grouped by stream, so most rows skip the map lookups.
    private int lastStream = -1;
    private long lastMinute = Long.MIN_VALUE;
    private long lastHour = Long.MIN_VALUE;
    private Agg minuteAgg;
    private Agg hourAgg;

    void add(int stream, long tsMs, double value) {
        long minute = Resolution.MINUTE.bucketStart(tsMs);
        long hour = Resolution.HOUR.bucketStart(tsMs);
        if (stream != lastStream || minute != lastMinute) {
            minuteAgg = minutes.computeIfAbsent(new Bucket(stream, minute), b -> new Agg());
        }
        if (stream != lastStream || hour != lastHour) {
            hourAgg = hours.computeIfAbsent(new Bucket(stream, hour), b -> new Agg());
        }
        lastStream = stream;
        lastMinute = minute;
        lastHour = hour;
        minuteAgg.add(value);
        hourAgg.add(value);
    }

    void writeTo(Connection conn) throws SQLException {
        upsert(conn, Resolution.MINUTE.table, minutes);
        upsert(conn, Resolution.HOUR.table, hours);
    }

    private static void upsert(Connection conn, String table, Map<Bucket, Agg> aggs) throws SQLException {
        if (aggs.isEmpty()) return;
        try (PreparedStatement ps = conn.prepareStatement("INSERT INTO " + table + "(stream, ts, n, lo, hi, total) VALUES (?, ?, ?, ?, ?, ?) "
                + "ON CONFLICT(stream, ts) DO UPDATE SET n = n + excluded.n, lo = min(lo, excluded.lo), "
                + "hi = max(hi, excluded.hi), total = total + excluded.total")) {
            for (Map.Entry<Bucket, Agg> e : aggs.entrySet()) {
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
