package byre.history;

import java.sql.Connection;
import java.sql.PreparedStatement;
import java.sql.ResultSet;
import java.sql.SQLException;
import java.time.Clock;
import java.util.ArrayList;
import java.util.List;

/**
 * Deletes rows older than the {@link Retention} ages, one small bounded step at a time, so the writer thread
 * can interleave steps with ingest batches. A round walks every (table, stream) pair; each step deletes at most
 * {@code stepRows} rows of one stream by a primary-key range and commits. Packed runs count by their readings: a
 * step deletes whole runs while they fit, and rewrites the next without its old readings (a run that straddles
 * the cutoff, or one larger than what is left of the step), so keep-raw holds to the reading there too.
 */
final class RetentionPruner {

    private static final String RUNS = "reading_run";
    private static final String[] TABLES = {"reading", RUNS, Resolution.MINUTE.table, Resolution.HOUR.table};

    private final Retention retention;
    private final Clock clock;
    private final int stepRows;

    private boolean active;
    private long[] cutoffs;
    private List<Integer> streams;
    private int tableIdx;
    private int streamIdx;

    RetentionPruner(Retention retention, Clock clock, int stepRows) {
        this.retention = retention;
        this.clock = clock;
        this.stepRows = stepRows;
    }

    boolean active() { return active; }

    void begin(Connection conn) throws SQLException {
        long now = clock.millis();
        cutoffs = new long[] {
            now - retention.keepRaw().toMillis(), now - retention.keepRaw().toMillis(), now - retention.keepMinute().toMillis(),
            now - retention.keepHour().toMillis()};
        streams = new ArrayList<>();
        try (PreparedStatement ps = conn.prepareStatement("SELECT id FROM stream ORDER BY id");
             ResultSet rs = ps.executeQuery()) {
            while (rs.next()) streams.add(rs.getInt(1));
        }
        tableIdx = 0;
        streamIdx = 0;
        active = !streams.isEmpty();
    }

    /** Deletes at most {@code stepRows} old rows of one stream in one table and commits; returns the count. */
    int step(Connection conn) throws SQLException {
        if (!active) return 0;
        String table = TABLES[tableIdx];
        int stream = streams.get(streamIdx);
        long cutoff = cutoffs[tableIdx];
        int deleted;
        WriterTx.begin(conn);
        try {
            if (table.equals(RUNS)) {
                deleted = stepRuns(conn, stream, cutoff);
                WriterTx.commit(conn);
                if (deleted < stepRows) advance();
                return deleted;
            }
            long lastTs = Long.MIN_VALUE;
            boolean more = false;
            // ts is unique within a stream, so "ts <= the stepRows-th oldest old ts" is exactly stepRows rows.
            try (PreparedStatement ps = conn.prepareStatement(
                    "SELECT ts FROM " + table + " WHERE stream = ? AND ts < ? ORDER BY ts LIMIT 1 OFFSET ?")) {
                ps.setInt(1, stream);
                ps.setLong(2, cutoff);
                ps.setInt(3, stepRows - 1);
                try (ResultSet rs = ps.executeQuery()) {
                    if (rs.next()) {
                        lastTs = rs.getLong(1);
                        more = true;
                    }
                }
            }
            try (PreparedStatement del = conn.prepareStatement(
                    more ? "DELETE FROM " + table + " WHERE stream = ? AND ts <= ?" : "DELETE FROM " + table + " WHERE stream = ? AND ts < ?")) {
                del.setInt(1, stream);
                del.setLong(2, more ? lastTs : cutoff);
                deleted = del.executeUpdate();
            }
            WriterTx.commit(conn);
            if (!more) advance();
        } catch (SQLException e) {
            WriterTx.rollbackQuietly(conn);
            throw e;
        }
        return deleted;
    }

    /**
     * Deletes the oldest at most {@code stepRows} readings of one stream's runs older than {@code cutoff}: whole runs
     * while they fit, then the first run left is rewritten without its old readings.
     */
    private int stepRuns(Connection conn, int stream, long cutoff) throws SQLException {
        int deleted = 0;
        long lastWhole = Long.MIN_VALUE;
        RunTable.Stored trim = null;
        try (PreparedStatement ps = conn.prepareStatement("SELECT ts, upto, n, data FROM reading_run WHERE stream = ? AND ts < ? ORDER BY ts")) {
            ps.setInt(1, stream);
            ps.setLong(2, cutoff);
            try (ResultSet rs = ps.executeQuery()) {
                while (rs.next()) {
                    long upto = rs.getLong(2);
                    int n = rs.getInt(3);
                    if (upto < cutoff && deleted + n <= stepRows) {
                        lastWhole = rs.getLong(1);
                        deleted += n;
                        continue;
                    }
                    if (deleted < stepRows) trim = new RunTable.Stored(rs.getLong(1), upto, n, rs.getBytes(4));
                    break;
                }
            }
        }
        if (lastWhole != Long.MIN_VALUE) {
            try (PreparedStatement del = conn.prepareStatement("DELETE FROM reading_run WHERE stream = ? AND ts <= ?")) {
                del.setInt(1, stream);
                del.setLong(2, lastWhole);
                del.executeUpdate();
            }
        }
        if (trim != null) {
            RunCodec.Run run = trim.decode();
            int old = 0;
            while (old < run.size() && run.tsMs()[old] < cutoff && deleted + old < stepRows) old++;
            if (old > 0) {
                RunTable.delete(conn, stream, trim.ts());
                RunTable.write(conn, stream, run.tsMs(), run.values(), old, run.size());
                deleted += old;
            }
        }
        return deleted;
    }

    private void advance() {
        streamIdx++;
        if (streamIdx >= streams.size()) {
            streamIdx = 0;
            tableIdx++;
            if (tableIdx >= TABLES.length) active = false;
        }
    }
}
