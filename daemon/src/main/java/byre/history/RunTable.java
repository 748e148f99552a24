package byre.history;

import java.sql.Connection;
import java.sql.PreparedStatement;
import java.sql.ResultSet;
import java.sql.SQLException;

/**
 * The SQL of the {@code reading_run} table on the writer's connection: packed runs of one stream's readings, keyed
 * (stream, first time), never overlapping in time within a stream.
 */
final class RunTable {
    private RunTable() {}

    /** Readings a run holds at most: a cut by count, so that a run stays one page cell (see {@link #MAX_DATA_BYTES}). */
    static final int MAX_READINGS = 256;
    /**
     * Bytes of packed data a run holds at most. A WITHOUT ROWID row is a cell of an index b-tree, kept whole in its
     * page only up to about 1000 bytes with 4 KiB pages; beyond that the rest spills to overflow pages of its own.
     */
    static final int MAX_DATA_BYTES = 900;
    /** A run this close to full is left alone; the next readings start a run of their own rather than rewrite it. */
    static final int FULL_DATA_BYTES = MAX_DATA_BYTES - 96;

    /** One stored run: first and last time (epoch ms), count, packed data. */
    record Stored(long ts, long upto, int n, byte[] data) {
        boolean full() { return n >= MAX_READINGS || data.length >= FULL_DATA_BYTES; }

        RunCodec.Run decode() throws SQLException {
            try {
                return RunCodec.decode(data);
            } catch (IllegalArgumentException e) {
                throw new SQLException("damaged run at " + ts + ": " + e.getMessage(), e);
            }
        }
    }

    /** The run of {@code stream} that starts at or before {@code ts} latest, or null. */
    static Stored floor(Connection conn, int stream, long ts) throws SQLException {
        try (PreparedStatement ps = conn.prepareStatement("SELECT ts, upto, n, data FROM reading_run WHERE stream = ? AND ts <= ? ORDER BY ts DESC LIMIT 1")) {
            ps.setInt(1, stream);
            ps.setLong(2, ts);
            try (ResultSet rs = ps.executeQuery()) {
                return rs.next() ? new Stored(rs.getLong(1), rs.getLong(2), rs.getInt(3), rs.getBytes(4)) : null;
            }
        }
    }

    /** The newest run of {@code stream}, or null. */
    static Stored newest(Connection conn, int stream) throws SQLException {
        return floor(conn, stream, Long.MAX_VALUE);
    }

    /** The first time of the first run of {@code stream} starting after {@code ts}, or {@code Long.MAX_VALUE}. */
    static long nextStart(Connection conn, int stream, long ts) throws SQLException {
        try (PreparedStatement ps = conn.prepareStatement("SELECT ts FROM reading_run WHERE stream = ? AND ts > ? ORDER BY ts LIMIT 1")) {
            ps.setInt(1, stream);
            ps.setLong(2, ts);
            try (ResultSet rs = ps.executeQuery()) {
                return rs.next() ? rs.getLong(1) : Long.MAX_VALUE;
            }
        }
    }

    static void delete(Connection conn, int stream, long ts) throws SQLException {
        try (PreparedStatement ps = conn.prepareStatement("DELETE FROM reading_run WHERE stream = ? AND ts = ?")) {
            ps.setInt(1, stream);
            ps.setLong(2, ts);
            if (ps.executeUpdate() != 1) throw new SQLException("run " + stream + "/" + ts + " vanished while being rewritten");
        }
    }

    /**
     * Stores readings [from, to) of the arrays (times strictly increasing, overlapping no stored run of the stream) as
     * runs of at most {@link #MAX_READINGS} readings and {@link #MAX_DATA_BYTES} bytes each.
     *
     * @return the number of runs written
     */
    static int write(Connection conn, int stream, long[] ts, double[] values, int from, int to) throws SQLException {
        int runs = 0;
        try (PreparedStatement insert = conn.prepareStatement("INSERT INTO reading_run(stream, ts, upto, n, data) VALUES (?, ?, ?, ?, ?)")) {
            for (int i = from; i < to; ) {
                int n = Math.min(MAX_READINGS, to - i);
                byte[] data = RunCodec.encode(ts, values, i, n);
                while (data.length > MAX_DATA_BYTES && n > 1) {
                    // Cut in proportion to the excess (readings of one run pack alike), at least one reading fewer.
                    n = Math.max(1, Math.min(n - 1, (int) ((long) n * MAX_DATA_BYTES / data.length)));
                    data = RunCodec.encode(ts, values, i, n);
                }
                insert.setInt(1, stream);
                insert.setLong(2, ts[i]);
                insert.setLong(3, ts[i + n - 1]);
                insert.setInt(4, n);
                insert.setBytes(5, data);
                insert.executeUpdate();
                runs++;
                i += n;
            }
        }
        return runs;
    }
}
