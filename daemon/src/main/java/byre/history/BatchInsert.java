package byre.history;

import java.sql.Connection;
import java.sql.PreparedStatement;
import java.sql.ResultSet;
import java.sql.SQLException;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.HashMap;
import java.util.Iterator;
import java.util.List;
import java.util.Map;

/**
 * The SQL of one batch, in one transaction: the raw rows (sorted by stream), the rollups of the rows that were
 * really added, and the rollup buckets that closed. No thread of its own: the writer's loop calls it, and tests
 * call it directly on a connection.
 */
final class BatchInsert {

    /** What one batch did. */
    record Result(int inserted, int duplicate, int tooOld, boolean rollupsWritten) {}

    private final Connection conn;
    private final OpenRollups rollups = new OpenRollups();
    private final RunSealer sealer;
    /** Rows the ten-minute write packs into runs at most; the rest goes in later steps ({@link #sealStep}). */
    private final int sealRows;
    private final Map<StreamKey, Integer> streamIds = new HashMap<>();
    /**
     * Zone rows (derived from sensor readings that are stored; no acknowledgement waits on them), held until the
     * rollups are next written and inserted in that transaction: a zone stream's rows of ten minutes then share one
     * page write instead of ten. A crash of byre loses at most these; the readings they came from are kept.
     */
    private final List<WriterItem.Row> heldZoneRows = new ArrayList<>();

    /** Reads the rollup marks and rebuilds the open rollup buckets (after a crash, from the raw rows). */
    BatchInsert(Connection conn) throws SQLException {
        this(conn, RunSealer.STEP_ROWS);
    }

    BatchInsert(Connection conn, int sealRows) throws SQLException {
        this.conn = conn;
        this.sealRows = sealRows;
        this.sealer = new RunSealer(conn);
        rollups.load(conn);
    }

    /** Whether raw rows older than the minute mark still wait to be packed into runs ({@link #sealStep}). */
    boolean sealBehind() { return sealer.behind(); }

    /** Raw rows packed into runs since start. */
    long rowsSealed() { return sealer.rowsSealed(); }

    /**
     * Packs at most {@code maxRows} raw rows older than the minute mark into runs and commits: the writer runs such
     * steps between batches while {@link #sealBehind()} (after an upgrade, or a ten-minute write that had more to do).
     *
     * @throws SQLException after rolling back
     */
    int sealStep(int maxRows) throws SQLException {
        try {
            WriterTx.begin(conn);
            int moved = sealer.seal(rollups.minuteMark(), maxRows);
            WriterTx.commit(conn);
            sealer.committed();
            return moved;
        } catch (SQLException | RuntimeException e) {
            WriterTx.rollbackQuietly(conn);
            sealer.rolledBack();
            throw e;
        }
    }

    int openRollupBuckets() { return rollups.openBuckets(); }

    /** Zone rows held in memory until the rollups are next written. */
    int heldZoneRows() { return heldZoneRows.size(); }

    /**
     * Writes the next {@code n} rows of {@code batch} and commits. Rows older than {@code cutoffMs} are skipped; a row whose (stream, time)
     * is stored already is ignored (the first value is kept, and the rollups count it once). With
     * {@code allRollups} every open rollup bucket and every held zone row is written too.
     *
     * @throws SQLException after rolling back: nothing of the batch is stored or counted
     */
    Result write(Iterator<WriterItem.Row> batch, int n, long nowMs, long cutoffMs, boolean allRollups) throws SQLException {
        Map<StreamKey, Integer> newIds = new HashMap<>();
        int inserted = 0;
        int duplicate = 0;
        int tooOld = 0;
        boolean rollupsWritten;
        boolean writeHeld = allRollups || rollups.writeDue(nowMs);
        int heldBefore = heldZoneRows.size();
        sealer.forgetRun();
        try {
            WriterTx.begin(conn);
            int capacity = n + (writeHeld ? heldBefore : 0);
            WriterItem.Row[] rows = new WriterItem.Row[capacity];
            // (stream id << 32 | position): sorted, the batch visits each stream's place in the table once and in
            // time order, which keeps the B-tree work local; a stream's rows keep their arrival order.
            long[] order = new long[capacity];
            int queued = 0;
            if (writeHeld) {
                for (WriterItem.Row r : heldZoneRows) {
                    if (r.tsMs < cutoffMs) {
                        tooOld++;
                        continue;
                    }
                    int id = streamId(r.key, newIds);
                    if (sealer.inRun(id, r.tsMs)) {
                        duplicate++;
                        continue;
                    }
                    rows[queued] = r;
                    order[queued] = ((long) id << 32) | queued;
                    queued++;
                }
            }
            for (int i = 0; i < n; i++) {
                WriterItem.Row r = batch.next();
                if (r.tsMs < cutoffMs) {
                    tooOld++;
                    continue;
                }
                if (!writeHeld && r.onStored == null && r.key.kind() == StreamKey.Kind.ZONE) {
                    heldZoneRows.add(r);
                    continue;
                }
                int id = streamId(r.key, newIds);
                // Rows go into `reading` by INSERT OR IGNORE, which sees no packed run: one older than its stream's
                // newest run is looked up there (a redelivery, a retained message with an old time).
                if (sealer.inRun(id, r.tsMs)) {
                    duplicate++;
                    continue;
                }
                rows[queued] = r;
                order[queued] = ((long) id << 32) | queued;
                queued++;
            }
            Arrays.sort(order, 0, queued);
            if (queued > 0) {
                try (PreparedStatement ins = conn.prepareStatement("INSERT OR IGNORE INTO reading(stream, ts, value) VALUES (?, ?, ?)")) {
                    for (int i = 0; i < queued; i++) {
                        WriterItem.Row r = rows[(int) order[i]];
                        ins.setInt(1, (int) (order[i] >>> 32));
                        ins.setLong(2, r.tsMs);
                        ins.setDouble(3, r.value);
                        ins.addBatch();
                    }
                    // sqlite-jdbc reports the change count of each statement: 0 means the row was already stored.
                    int[] changes = ins.executeBatch();
                    if (changes.length != queued) throw new SQLException("batch insert reported " + changes.length + " results for " + queued + " rows");
                    for (int i = 0; i < queued; i++) {
                        if (changes[i] == 1) {
                            inserted++;
                            WriterItem.Row r = rows[(int) order[i]];
                            rollups.add((int) (order[i] >>> 32), r.tsMs, r.value);
                        } else if (changes[i] == 0) {
                            duplicate++;
                        } else {
                            throw new SQLException("batch insert gave no row count (" + changes[i] + "); cannot keep rollups exact");
                        }
                    }
                }
            }
            rollupsWritten = rollups.write(conn, nowMs, allRollups);
            if (rollupsWritten || allRollups) {
                // The rows the written buckets cover become runs in the same commit: their pages are written once.
                // A flush packs late rows too (older than the mark, they wait as rows for the next ten-minute write).
                sealer.markMoved();
                sealer.seal(rollups.stagedMinuteMark(), sealRows);
            }
            WriterTx.commit(conn);
        } catch (SQLException | RuntimeException e) {
            WriterTx.rollbackQuietly(conn);
            rollups.rolledBack();
            sealer.rolledBack();
            heldZoneRows.subList(heldBefore, heldZoneRows.size()).clear(); // the batch stays in the backlog and comes again
            throw e;
        }
        rollups.committed();
        sealer.committed();
        if (writeHeld) heldZoneRows.clear();
        streamIds.putAll(newIds);
        return new Result(inserted, duplicate, tooOld, rollupsWritten);
    }

    /** The id of a stream, creating it in the current transaction; new ids are cached only after commit. */
    private int streamId(StreamKey key, Map<StreamKey, Integer> newIds) throws SQLException {
        Integer id = streamIds.get(key);
        if (id == null) id = newIds.get(key);
        if (id != null) return id;
        try (PreparedStatement ps = conn.prepareStatement("INSERT OR IGNORE INTO stream(kind, key) VALUES (?, ?)")) {
            ps.setString(1, key.kind().dbName());
            ps.setString(2, key.name());
            ps.executeUpdate();
        }
        try (PreparedStatement ps = conn.prepareStatement("SELECT id FROM stream WHERE kind = ? AND key = ?")) {
            ps.setString(1, key.kind().dbName());
            ps.setString(2, key.name());
            try (ResultSet rs = ps.executeQuery()) {
                if (!rs.next()) throw new SQLException("stream " + key + " vanished while being created");
                id = rs.getInt(1);
            }
        }
        newIds.put(key, id);
        return id;
    }
}
