package byre.history;

import java.sql.Connection;
import java.sql.PreparedStatement;
import java.sql.ResultSet;
import java.sql.SQLException;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;

/**
 * Moves raw readings from the {@code reading} table (the hot tail, a row each) into packed runs
 * ({@code reading_run}, see {@link RunCodec}), in the caller's transaction: the rows go and their runs come in one
 * commit, so a reading is always in exactly one of the two tables.
 *
 * <p>Only rows older than the minute mark move: after a crash the open rollups are rebuilt from the raw rows newer
 * than the mark, and those stay in {@code reading}. A row that came late (older than the newest run of its stream)
 * joins the run it falls in, or the run before it; on a time stored in both, the run's value stays (it was stored
 * first, as {@code INSERT OR IGNORE} keeps the first).
 *
 * <p>Work is bounded: each call moves at most the rows it is given, walking the streams from where the last call
 * stopped, so a file with millions of rows in {@code reading} (an upgrade) is packed over many steps between batches.
 * Not thread-safe: the writer thread's.
 */
final class RunSealer {

    /** Rows one step moves at most (a step of the writer's loop, or the ten-minute rollup write). */
    static final int STEP_ROWS = 20_000;
    private static final long UNKNOWN = Long.MAX_VALUE;
    private static final long NO_RUN = Long.MIN_VALUE;

    private final Connection conn;
    /** By stream id: the last time of the stream's newest run, {@link #NO_RUN}, or {@link #UNKNOWN} (not read yet). */
    private long[] newestUpto = new long[0];
    /** The run last decoded for a duplicate check (a redelivered burst asks about one run many times). */
    private int cachedStream = -1;
    private RunCodec.Run cachedRun;

    /** The streams of the pass under way (null: none), and the index of the stream to continue with. */
    private List<Integer> pass;
    private int passIdx;
    /** A new pass is due: at start (the file may hold anything), after the mark moved, after a rollback. */
    private boolean passWanted = true;
    private long rowsSealed;
    /** Rows moved by the transaction under way. */
    private long rowsStaged;

    RunSealer(Connection conn) {
        this.conn = conn;
    }

    /** Whether rows older than the mark may still wait in {@code reading}. */
    boolean behind() { return passWanted || pass != null; }

    /** Rows moved into runs since start, by committed transactions. */
    long rowsSealed() { return rowsSealed; }

    /** The caller's transaction was committed. */
    void committed() {
        rowsSealed += rowsStaged;
        rowsStaged = 0;
    }

    /** The mark moved: every stream may have rows to move. */
    void markMoved() { passWanted = true; }

    /** Drops the run kept for duplicate checks: retention may have changed it since. */
    void forgetRun() { cachedRun = null; }

    /** The caller's transaction was rolled back: forget what it changed (read again when needed). */
    void rolledBack() {
        rowsStaged = 0;
        Arrays.fill(newestUpto, UNKNOWN);
        cachedRun = null;
        pass = null;
        passWanted = true;
    }

    /**
     * Whether {@code (stream, ts)} is stored in a run already: then a row for it is a duplicate. A cheap comparison
     * for rows newer than the stream's newest run (nearly all); a look into the run for older ones.
     */
    boolean inRun(int stream, long ts) throws SQLException {
        if (ts > newestUpto(stream)) return false;
        if (cachedRun == null || cachedStream != stream || ts < cachedRun.first() || ts > cachedRun.last()) {
            RunTable.Stored floor = RunTable.floor(conn, stream, ts);
            if (floor == null || floor.upto() < ts) return false;
            cachedRun = floor.decode();
            cachedStream = stream;
        }
        return cachedRun.indexOf(ts) >= 0;
    }

    private long newestUpto(int stream) throws SQLException {
        if (stream >= newestUpto.length) {
            int old = newestUpto.length;
            newestUpto = Arrays.copyOf(newestUpto, Math.max(stream + 1, old * 2));
            Arrays.fill(newestUpto, old, newestUpto.length, UNKNOWN);
        }
        long upto = newestUpto[stream];
        if (upto == UNKNOWN) {
            RunTable.Stored newest = RunTable.newest(conn, stream);
            upto = newest == null ? NO_RUN : newest.upto();
            newestUpto[stream] = upto;
        }
        return upto;
    }

    /**
     * Moves at most {@code maxRows} rows older than {@code beforeMs} into runs, in the caller's transaction.
     *
     * @return the number of rows moved
     */
    int seal(long beforeMs, int maxRows) throws SQLException {
        if (pass == null) {
            if (!passWanted) return 0;
            pass = new ArrayList<>();
            try (PreparedStatement ps = conn.prepareStatement("SELECT id FROM stream ORDER BY id"); ResultSet rs = ps.executeQuery()) {
                while (rs.next()) pass.add(rs.getInt(1));
            }
            passIdx = 0;
            passWanted = false;
        }
        int moved = 0;
        while (passIdx < pass.size()) {
            int budget = maxRows - moved;
            if (budget <= 0) return moved;
            int got = sealStream(pass.get(passIdx), beforeMs, budget);
            moved += got;
            if (got == budget) return moved; // the stream may have more: the next step continues with it
            passIdx++;
        }
        pass = null;
        return moved;
    }

    /** Moves the oldest rows of one stream older than {@code beforeMs}, at most {@code maxRows}; returns how many. */
    private int sealStream(int stream, long beforeMs, int maxRows) throws SQLException {
        long[] ts = new long[Math.min(maxRows, 1024)];
        double[] values = new double[ts.length];
        int n = 0;
        try (PreparedStatement ps = conn.prepareStatement("SELECT ts, value FROM reading WHERE stream = ? AND ts < ? ORDER BY ts LIMIT ?")) {
            ps.setInt(1, stream);
            ps.setLong(2, beforeMs);
            ps.setInt(3, maxRows);
            try (ResultSet rs = ps.executeQuery()) {
                while (rs.next()) {
                    if (n == ts.length) {
                        ts = Arrays.copyOf(ts, Math.min(maxRows, n * 2));
                        values = Arrays.copyOf(values, ts.length);
                    }
                    ts[n] = rs.getLong(1);
                    values[n] = rs.getDouble(2);
                    n++;
                }
            }
        }
        if (n == 0) return 0;
        // ts is unique within a stream and the rows came oldest first: "ts <= the last" is exactly these rows.
        try (PreparedStatement del = conn.prepareStatement("DELETE FROM reading WHERE stream = ? AND ts <= ?")) {
            del.setInt(1, stream);
            del.setLong(2, ts[n - 1]);
            int deleted = del.executeUpdate();
            if (deleted != n) throw new SQLException("sealing stream " + stream + ": read " + n + " rows but deleted " + deleted);
        }
        cachedRun = null;
        long upto = newestUpto(stream);
        for (int i = 0; i < n; ) {
            // Rows before the next run's start go with the run at or before them: runs never overlap.
            RunTable.Stored floor = RunTable.floor(conn, stream, ts[i]);
            long next = RunTable.nextStart(conn, stream, ts[i]);
            int j = i + 1;
            while (j < n && ts[j] < next) j++;
            if (floor == null || (ts[i] > floor.upto() && floor.full())) {
                RunTable.write(conn, stream, ts, values, i, j);
            } else {
                RunCodec.Run run = floor.decode();
                RunTable.delete(conn, stream, floor.ts());
                Merged m = merge(run, ts, values, i, j);
                RunTable.write(conn, stream, m.ts, m.values, 0, m.n);
            }
            upto = Math.max(upto, ts[j - 1]);
            i = j;
        }
        newestUpto[stream] = upto;
        rowsStaged += n;
        return n;
    }

    private record Merged(long[] ts, double[] values, int n) {}

    /** A run and rows [from, to) in one time order; on a time in both, the run's value (stored first) stays. */
    private static Merged merge(RunCodec.Run run, long[] ts, double[] values, int from, int to) {
        int cap = run.size() + to - from;
        long[] mt = new long[cap];
        double[] mv = new double[cap];
        int a = 0;
        int b = from;
        int n = 0;
        long[] rt = run.tsMs();
        double[] rv = run.values();
        while (a < rt.length || b < to) {
            if (b >= to || (a < rt.length && rt[a] <= ts[b])) {
                if (b < to && rt[a] == ts[b]) b++;
                mt[n] = rt[a];
                mv[n++] = rv[a++];
            } else {
                mt[n] = ts[b];
                mv[n++] = values[b++];
            }
        }
        return new Merged(mt, mv, n);
    }
}
