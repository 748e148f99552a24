package byre.history;

import java.sql.Connection;
import java.sql.PreparedStatement;
import java.sql.ResultSet;
import java.sql.SQLException;

/**
 * The SQL of the {@code reading_run} table on the writer's connection: packed runs of one stream's readings, keyed
 * (stream, first time), never overlapping in time within a stream. Statements are prepared once and kept.
 */
final class RunTable {

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

    private final Connection conn;
    private PreparedStatement floor;
    private PreparedStatement nextStart;
    private PreparedStatement insert;
    private PreparedStatement delete;

    RunTable(Connection conn) {
        this.conn = conn;
    }

    /** The run of {@code stream} that starts at or before {@code ts} latest, or null. */
    Stored floor(int stream, long ts) throws SQLException {
        if (floor == null) {
            floor = conn.prepareStatement("SELECT ts, upto, n, data FROM reading_run WHERE stream = ? AND ts <= ? ORDER BY ts DESC LIMIT 1");
        }
        floor.setInt(1, stream);
        floor.setLong(2, ts);
        try (ResultSet rs = floor.executeQuery()) {
            return rs.next() ? new Stored(rs.getLong(1), rs.getLong(2), rs.getInt(3), rs.getBytes(4)) : null;
        }
    }

    /** The newest run of {@code stream}, or null. */
    Stored newest(int stream) throws SQLException {
        return floor(stream, Long.MAX_VALUE);
    }

    /** The first time of the first run of {@code stream} starting after {@code ts}, or {@code Long.MAX_VALUE}. */
    long nextStart(int stream, long ts) throws SQLException {
        if (nextStart == null) {
            nextStart = conn.prepareStatement("SELECT ts FROM reading_run WHERE stream = ? AND ts > ? ORDER BY ts LIMIT 1");
        }
        nextStart.setInt(1, stream);
        nextStart.setLong(2, ts);
        try (ResultSet rs = nextStart.executeQuery()) {
            return rs.next() ? rs.getLong(1) : Long.MAX_VALUE;
        }
    }

    void delete(int stream, long ts) throws SQLException {
        if (delete == null) delete = conn.prepareStatement("DELETE FROM reading_run WHERE stream = ? AND ts = ?");
        delete.setInt(1, stream);
        delete.setLong(2, ts);
        if (delete.executeUpdate() != 1) throw new SQLException("run " + stream + "/" + ts + " vanished while being rewritten");
    }

    /**
     * Stores readings [from, to) of the arrays (times strictly increasing, overlapping no stored run of the stream) as
     * runs of at most {@link #MAX_READINGS} readings and {@link #MAX_DATA_BYTES} bytes each.
     *
     * @return the number of runs written
     */
    int write(int stream, long[] ts, double[] values, int from, int to) throws SQLException {
        if (insert == null) insert = conn.prepareStatement("INSERT INTO reading_run(stream, ts, upto, n, data) VALUES (?, ?, ?, ?, ?)");
        int runs = 0;
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
        return runs;
    }
}
