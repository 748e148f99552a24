package byre.history;

import java.sql.Connection;
import java.sql.PreparedStatement;
import java.sql.ResultSet;
import java.sql.SQLException;
import java.time.Duration;
import java.time.Instant;
import java.util.ArrayList;
import java.util.Collection;
import java.util.Comparator;
import java.util.List;
import java.util.Optional;
import java.util.PriorityQueue;
import java.util.function.Consumer;

/**
 * Queries over the history on its own read-only connection; safe while the daemon writes (WAL readers see a
 * consistent snapshot per call and never block the writer). Time ranges are [from, to); a null bound is open.
 * Results are delivered in time order; the {@code forEach...} forms stream rows to a callback without holding
 * them all in memory (for large CSV exports). Not for use by several threads at once.
 */
public final class HistoryReader implements AutoCloseable {

    private static final long HOUR_MS = Resolution.HOUR.widthMs;
    private static final long MINUTE_MS = Resolution.MINUTE.widthMs;

    private final Connection conn;
    private boolean hasRuns;

    /**
     * This reader's read-only connection, for a stage that keeps its own tables in the history file and reads them
     * while the daemon is down (a central byre's site events). It stays this reader's: do not close it.
     */
    public Connection connection() {
        return conn;
    }

    HistoryReader(Connection conn) {
        this.conn = conn;
    }

    /**
     * Opens an existing history for reading only, without creating, migrating or writing anything (for
     * {@code byre status} and {@code byre history} while the daemon runs, possibly as another user).
     *
     * @throws HistoryException when the file is missing, not readable, or not a byre history this build can read
     */
    public static HistoryReader openReadOnly(java.nio.file.Path file) {
        java.nio.file.Path abs = file.toAbsolutePath();
        if (!java.nio.file.Files.isRegularFile(abs)) {
            throw new HistoryException("history " + abs + " does not exist yet (the daemon creates it on its first start)");
        }
        if (!java.nio.file.Files.isReadable(abs)) {
            throw new HistoryException("history " + abs + " is not readable by this user; run as root or as a member of its group");
        }
        Connection c = null;
        try {
            c = HistoryStore.connect(abs, true, false);
            int version;
            int appId;
            try (java.sql.Statement st = c.createStatement()) {
                try (ResultSet rs = st.executeQuery("PRAGMA user_version")) { version = rs.next() ? rs.getInt(1) : 0; }
                try (ResultSet rs = st.executeQuery("PRAGMA application_id")) { appId = rs.next() ? rs.getInt(1) : 0; }
            }
            if (appId != Migrations.APPLICATION_ID || version < 1) {
                throw new HistoryException("history " + abs + " is not a byre history");
            }
            if (version > Migrations.latestVersion()) {
                throw new HistoryException("history " + abs + " has schema version " + version + ", newer than this byre knows ("
                    + Migrations.latestVersion() + "); use the byre that wrote it");
            }
            return new HistoryReader(c);
        } catch (SQLException e) {
            HistoryStore.closeQuietly(c);
            throw new HistoryException("history " + abs + ": cannot open for reading: " + e.getMessage(), e);
        } catch (RuntimeException e) {
            HistoryStore.closeQuietly(c);
            throw e;
        }
    }

    /** Entries of the durable state table whose key starts with {@code prefix}, ordered by key. */
    public java.util.Map<String, String> state(String prefix) {
        String p = prefix == null ? "" : prefix;
        java.util.Map<String, String> out = new java.util.LinkedHashMap<>();
        query("state " + p + "*", "SELECT key, value FROM state WHERE substr(key, 1, ?) = ? ORDER BY key", ps -> {
            ps.setInt(1, p.length());
            ps.setString(2, p);
        }, rs -> out.put(rs.getString(1), rs.getString(2)));
        return out;
    }

    /** Every stream ever written, sensors first, each ordered by name. */
    public List<StreamKey> streams() {
        List<StreamKey> out = new ArrayList<>();
        query("list streams", "SELECT kind, key FROM stream ORDER BY kind, key", ps -> { }, rs -> {
            toKey(rs.getString(1), rs.getString(2)).ifPresent(out::add);
        });
        return out;
    }

    /** The newest stored reading of every stream that has one, in {@link #streams()} order. */
    public List<HistoryRow> latest() {
        record Stream(int id, StreamKey key) {}
        List<Stream> streams = new ArrayList<>();
        query("list streams", "SELECT id, kind, key FROM stream ORDER BY kind, key", ps -> { }, rs -> {
            int id = rs.getInt(1);
            toKey(rs.getString(2), rs.getString(3)).ifPresent(k -> streams.add(new Stream(id, k)));
        });
        List<HistoryRow> out = new ArrayList<>();
        for (Stream s : streams) newest(s.id(), s.key()).ifPresent(out::add);
        return out;
    }

    /** The newest stored reading of one stream. */
    public Optional<HistoryRow> latest(StreamKey key) {
        int id = streamId(key);
        return id < 0 ? Optional.empty() : newest(id, key);
    }

    private Optional<HistoryRow> newest(int id, StreamKey key) {
        try (RawCursor c = new RawCursor(conn, id, Long.MIN_VALUE, Long.MAX_VALUE, true, hasRuns())) {
            return c.next() ? Optional.of(new HistoryRow(key, Instant.ofEpochMilli(c.ts()), c.value())) : Optional.empty();
        } catch (SQLException e) {
            throw new HistoryException("history query (latest value of " + key + ") failed: " + e.getMessage(), e);
        }
    }

    /** Raw readings of one stream in [from, to), oldest first. */
    public List<HistoryRow> raw(StreamKey key, Instant from, Instant to) {
        List<HistoryRow> out = new ArrayList<>();
        forEachRaw(key, from, to, out::add);
        return out;
    }

    /**
     * The times (epoch ms, oldest first) of at most {@code limit} newest raw readings of one stream in [from, to):
     * one walk back along the (stream, time) key, however long the history.
     */
    public long[] latestTimes(StreamKey key, Instant from, Instant to, int limit) {
        long[] times = new long[Math.max(0, limit)];
        int n = 0;
        int id = streamId(key);
        if (id >= 0 && limit > 0) {
            try (RawCursor c = new RawCursor(conn, id, lo(from), hi(to), true, hasRuns())) {
                while (n < limit && c.next()) times[n++] = c.ts();
            } catch (SQLException e) {
                throw new HistoryException("history query (latest times of " + key + ") failed: " + e.getMessage(), e);
            }
        }
        long[] out = new long[n];
        for (int i = 0; i < n; i++) out[i] = times[n - 1 - i];
        return out;
    }

    /** Streams the raw readings of one stream in [from, to), oldest first, to {@code sink}. */
    public void forEachRaw(StreamKey key, Instant from, Instant to, Consumer<HistoryRow> sink) {
        rawRange(key, lo(from), hi(to), sink);
    }

    private void rawRange(StreamKey key, long lo, long hi, Consumer<HistoryRow> sink) {
        int id = streamId(key);
        if (id < 0) return;
        try (RawCursor c = new RawCursor(conn, id, lo, hi, false, hasRuns())) {
            while (c.next()) sink.accept(new HistoryRow(key, Instant.ofEpochMilli(c.ts()), c.value()));
        } catch (SQLException e) {
            throw new HistoryException("history query (raw readings of " + key + ") failed: " + e.getMessage(), e);
        }
    }

    /**
     * Streams the raw readings of several streams in [from, to) merged into one time order (ties by stream
     * order in {@code keys}), as replay needs them. Each stream is read by its own cursor, so no sort is needed.
     */
    public void forEachRawInTimeOrder(Collection<StreamKey> keys, Instant from, Instant to, Consumer<HistoryRow> sink) {
        record Cursor(int order, StreamKey key, RawCursor raw) {}
        PriorityQueue<Cursor> heap = new PriorityQueue<>(Comparator.<Cursor>comparingLong(c -> c.raw().ts()).thenComparingInt(Cursor::order));
        List<Cursor> all = new ArrayList<>();
        try {
            int order = 0;
            boolean withRuns = hasRuns();
            for (StreamKey key : keys) {
                int id = streamId(key);
                int o = order++;
                if (id < 0) continue;
                Cursor c = new Cursor(o, key, new RawCursor(conn, id, lo(from), hi(to), false, withRuns));
                all.add(c);
                if (c.raw().next()) heap.add(c);
            }
            while (!heap.isEmpty()) {
                Cursor c = heap.poll();
                sink.accept(new HistoryRow(c.key(), Instant.ofEpochMilli(c.raw().ts()), c.raw().value()));
                if (c.raw().next()) heap.add(c);
            }
        } catch (SQLException e) {
            throw new HistoryException("history read of " + keys.size() + " streams failed: " + e.getMessage(), e);
        } finally {
            for (Cursor c : all) c.raw().close();
        }
    }

    /** Stored minute or hour rollups of one stream whose bucket starts in [from, to), oldest first. */
    public List<RollupRow> rollups(StreamKey key, Resolution resolution, Instant from, Instant to) {
        List<RollupRow> out = new ArrayList<>();
        forEachRollup(key, resolution, from, to, out::add);
        return out;
    }

    /**
     * Streams the rollups of one stream whose bucket starts in [from, to), oldest first. Buckets the writer still
     * holds in memory (newer than the level's mark, see {@code rollup_mark}) are summed from the finer stored levels.
     */
    public void forEachRollup(StreamKey key, Resolution resolution, Instant from, Instant to, Consumer<RollupRow> sink) {
        long[] marks;
        try {
            marks = OpenRollups.readMarks(conn);
        } catch (SQLException e) {
            throw new HistoryException("history query (rollup marks) failed: " + e.getMessage(), e);
        }
        long mark = resolution == Resolution.MINUTE ? marks[0] : marks[1];
        long lo = lo(from);
        long hi = hi(to);
        storedRollups(key, resolution, lo, Math.min(hi, mark), sink);
        if (hi <= mark) return;
        // Buckets starting in [start, end): the marks are aligned to their level's width.
        long w = resolution.widthMs;
        long start = lo <= mark ? mark : -Math.floorDiv(-lo, w) * w;
        long end = hi == Long.MAX_VALUE ? hi : -Math.floorDiv(-hi, w) * w;
        if (start >= end) return;
        BucketMerger merger = new BucketMerger(key, resolution.width(), sink);
        long rawFrom = start;
        if (resolution == Resolution.HOUR && marks[0] > start) {
            storedRollups(key, Resolution.MINUTE, start, Math.min(end, marks[0]), merger::add);
            rawFrom = Math.max(start, marks[0]);
        }
        if (rawFrom < end) rawRange(key, rawFrom, end, merger::add);
        merger.finish();
    }

    private void storedRollups(StreamKey key, Resolution resolution, long lo, long hi, Consumer<RollupRow> sink) {
        if (lo >= hi) return;
        Duration width = resolution.width();
        query(resolution.name().toLowerCase() + " rollups of " + key, "SELECT r.ts, r.lo, r.hi, r.total, r.n FROM " + resolution.table
                + " r JOIN stream s ON s.id = r.stream WHERE s.kind = ? AND s.key = ? AND r.ts >= ? AND r.ts < ? ORDER BY r.ts",
            ps -> {
                bindKey(ps, 1, key);
                ps.setLong(3, lo);
                ps.setLong(4, hi);
            },
            rs -> {
                long n = rs.getLong(5);
                sink.accept(new RollupRow(key, Instant.ofEpochMilli(rs.getLong(1)), width, rs.getDouble(2), rs.getDouble(3), rs.getDouble(4) / n, n));
            });
    }

    /** Buckets of any width, see {@link #forEachBucket}. */
    public List<RollupRow> buckets(StreamKey key, Duration every, Instant from, Instant to) {
        List<RollupRow> out = new ArrayList<>();
        forEachBucket(key, every, from, to, out::add);
        return out;
    }

    /**
     * Streams summaries of one stream in buckets of width {@code every} ({@code history --every 15m}), aligned to
     * the Unix epoch (UTC), covering whole buckets that overlap [from, to). Built from the coarsest stored level
     * whose width divides {@code every}: hour rollups when {@code every} is whole hours, else minute rollups when
     * it is whole minutes, else raw readings. So buckets older than keep-minute need whole hours. Empty buckets
     * are left out.
     *
     * @throws IllegalArgumentException when {@code every} is not positive
     */
    public void forEachBucket(StreamKey key, Duration every, Instant from, Instant to, Consumer<RollupRow> sink) {
        if (every == null || every.isNegative() || every.isZero() || every.toMillis() == 0) {
            throw new IllegalArgumentException("bucket width must be at least 1 ms, got " + every);
        }
        long w = every.toMillis();
        long fromMs = from == null ? Long.MIN_VALUE : Math.floorDiv(from.toEpochMilli(), w) * w;
        long toMs = to == null ? Long.MAX_VALUE : -Math.floorDiv(-to.toEpochMilli(), w) * w;
        Instant f = from == null ? null : Instant.ofEpochMilli(fromMs);
        Instant t = to == null ? null : Instant.ofEpochMilli(toMs);
        BucketMerger merger = new BucketMerger(key, every, sink);
        if (w % HOUR_MS == 0) {
            forEachRollup(key, Resolution.HOUR, f, t, merger::add);
        } else if (w % MINUTE_MS == 0) {
            forEachRollup(key, Resolution.MINUTE, f, t, merger::add);
        } else {
            forEachRaw(key, f, t, merger::add);
        }
        merger.finish();
    }

    @Override
    public void close() {
        HistoryStore.closeQuietly(conn);
    }

    // ---- helpers ----

    /** The id of a stream, or -1 when it was never written. */
    private int streamId(StreamKey key) {
        int[] id = {-1};
        query("stream " + key, "SELECT id FROM stream WHERE kind = ? AND key = ?", ps -> bindKey(ps, 1, key), rs -> id[0] = rs.getInt(1));
        return id[0];
    }

    /**
     * Whether the file has the table of packed runs: one written by an older byre (schema 4 or older, read while that
     * byre runs) has not. Asked again until it has, as that byre may be upgraded meanwhile.
     */
    private boolean hasRuns() {
        if (!hasRuns) {
            query("tables", "SELECT 1 FROM sqlite_schema WHERE type = 'table' AND name = 'reading_run'", ps -> { }, rs -> hasRuns = true);
        }
        return hasRuns;
    }

    @FunctionalInterface
    private interface Binder {
        void bind(PreparedStatement ps) throws SQLException;
    }

    @FunctionalInterface
    private interface RowHandler {
        void handle(ResultSet rs) throws SQLException;
    }

    private void query(String what, String sql, Binder binder, RowHandler handler) {
        try (PreparedStatement ps = conn.prepareStatement(sql)) {
            binder.bind(ps);
            try (ResultSet rs = ps.executeQuery()) {
                while (rs.next()) handler.handle(rs);
            }
        } catch (SQLException e) {
            throw new HistoryException("history query (" + what + ") failed: " + e.getMessage(), e);
        }
    }

    private static void bindKey(PreparedStatement ps, int index, StreamKey key) throws SQLException {
        ps.setString(index, key.kind().dbName());
        ps.setString(index + 1, key.name());
    }

    private static Optional<StreamKey> toKey(String kind, String key) {
        return StreamKey.Kind.fromDb(kind).map(k -> new StreamKey(k, key));
    }

    private static long lo(Instant from) { return from == null ? Long.MIN_VALUE : from.toEpochMilli(); }

    private static long hi(Instant to) { return to == null ? Long.MAX_VALUE : to.toEpochMilli(); }
}
