package byre.history;

import java.sql.Connection;
import java.sql.PreparedStatement;
import java.sql.ResultSet;
import java.sql.SQLException;

/**
 * The raw readings of one stream in [lo, hi), oldest or newest first: its packed runs ({@code reading_run}) and its
 * rows ({@code reading}) merged into one time order, a time stored in both given once (the run's value: it was
 * stored first). Holds one decoded run at a time, so a long range streams in little memory.
 */
final class RawCursor implements AutoCloseable {

    private final boolean newestFirst;
    private final long lo;
    private final long hi;
    private final PreparedStatement rowPs;
    private final ResultSet rows;
    private final PreparedStatement runPs;
    private final ResultSet runs;

    private boolean rowValid;
    private long rowTs;
    private double rowValue;

    private RunCodec.Run run;
    private int runIdx;
    /** A run reached past the range's far end: later runs are further still. */
    private boolean runsDone;
    private boolean runValid;
    private long runTs;
    private double runValue;

    private long ts;
    private double value;

    /**
     * @param withRuns false for a file from before packed runs (schema version 4 or older, read while an older byre
     *                 writes it)
     */
    RawCursor(Connection conn, int stream, long lo, long hi, boolean newestFirst, boolean withRuns) throws SQLException {
        this.newestFirst = newestFirst;
        this.lo = lo;
        this.hi = hi;
        PreparedStatement rp = null;
        ResultSet r = null;
        PreparedStatement up = null;
        ResultSet u = null;
        try {
            rp = conn.prepareStatement("SELECT ts, value FROM reading WHERE stream = ? AND ts >= ? AND ts < ? ORDER BY ts" + (newestFirst ? " DESC" : ""));
            rp.setInt(1, stream);
            rp.setLong(2, lo);
            rp.setLong(3, hi);
            r = rp.executeQuery();
            if (withRuns) {
                if (newestFirst) {
                    up = conn.prepareStatement("SELECT data FROM reading_run WHERE stream = ? AND ts < ? ORDER BY ts DESC");
                    up.setInt(1, stream);
                    up.setLong(2, hi);
                } else {
                    // From the run that starts at or before lo (it may hold readings from lo on): runs never overlap.
                    up = conn.prepareStatement("SELECT data FROM reading_run WHERE stream = ? "
                        + "AND ts >= coalesce((SELECT max(ts) FROM reading_run WHERE stream = ? AND ts <= ?), ?) AND ts < ? ORDER BY ts");
                    up.setInt(1, stream);
                    up.setInt(2, stream);
                    up.setLong(3, lo);
                    up.setLong(4, lo);
                    up.setLong(5, hi);
                }
                u = up.executeQuery();
            }
        } catch (SQLException | RuntimeException e) {
            HistoryStore.closeQuietly(u);
            HistoryStore.closeQuietly(up);
            HistoryStore.closeQuietly(r);
            HistoryStore.closeQuietly(rp);
            throw e;
        }
        rowPs = rp;
        rows = r;
        runPs = up;
        runs = u;
        advanceRow();
        advanceRun();
    }

    /** Moves to the next reading; false when there is none. */
    boolean next() throws SQLException {
        if (!rowValid && !runValid) return false;
        boolean takeRun;
        if (!rowValid) takeRun = true;
        else if (!runValid) takeRun = false;
        else takeRun = newestFirst ? runTs >= rowTs : runTs <= rowTs;
        if (takeRun) {
            ts = runTs;
            value = runValue;
            if (rowValid && rowTs == runTs) advanceRow();
            advanceRun();
        } else {
            ts = rowTs;
            value = rowValue;
            advanceRow();
        }
        return true;
    }

    long ts() { return ts; }

    double value() { return value; }

    private void advanceRow() throws SQLException {
        rowValid = rows.next();
        if (rowValid) {
            rowTs = rows.getLong(1);
            rowValue = rows.getDouble(2);
        }
    }

    private void advanceRun() throws SQLException {
        while (true) {
            if (run != null && runIdx >= 0 && runIdx < run.size()) {
                long t = run.tsMs()[runIdx];
                boolean inRange = t >= lo && t < hi;
                boolean pastEnd = newestFirst ? t < lo : t >= hi;
                if (pastEnd) {
                    runsDone = true;
                    break;
                }
                double v = run.values()[runIdx];
                runIdx += newestFirst ? -1 : 1;
                if (inRange) {
                    runValid = true;
                    runTs = t;
                    runValue = v;
                    return;
                }
                continue;
            }
            if (runsDone || runs == null || !runs.next()) break;
            byte[] data = runs.getBytes(1);
            try {
                run = RunCodec.decode(data);
            } catch (IllegalArgumentException e) {
                throw new SQLException("damaged run of readings: " + e.getMessage(), e);
            }
            runIdx = newestFirst ? run.size() - 1 : 0;
        }
        runValid = false;
        run = null;
    }

    @Override
    public void close() {
        HistoryStore.closeQuietly(runs);
        HistoryStore.closeQuietly(runPs);
        HistoryStore.closeQuietly(rows);
        HistoryStore.closeQuietly(rowPs);
    }
}
