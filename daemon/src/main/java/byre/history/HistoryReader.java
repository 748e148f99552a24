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
        List<HistoryRow> out = new ArrayList<>();
        query("latest values", "SELECT s.kind, s.key, r.ts, r.value FROM stream s "
                + "JOIN reading r ON r.stream = s.id AND r.ts = (SELECT max(ts) FROM reading WHERE stream = s.id) "
                + "ORDER BY s.kind, s.key", ps -> { },
            rs -> {
                Optional<StreamKey> k = toKey(rs.getString(1), rs.getString(2));
                if (k.isPresent()) out.add(new HistoryRow(k.get(), Instant.ofEpochMilli(rs.getLong(3)), rs.getDouble(4)));
            });
        return out;
    }

    /** The newest stored reading of one stream. */
    public Optional<HistoryRow> latest(StreamKey key) {
        List<HistoryRow> out = new ArrayList<>(1);
        query("latest value of " + key, "SELECT r.ts, r.value FROM reading r JOIN stream s ON s.id = r.stream "
                + "WHERE s.kind = ? AND s.key = ? ORDER BY r.ts DESC LIMIT 1", ps -> bindKey(ps, 1, key),
            rs -> out.add(new HistoryRow(key, Instant.ofEpochMilli(rs.getLong(1)), rs.getDouble(2))));
        return out.stream().findFirst();
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
        long[] times = new long[limit];
        int[] n = {0};
        query("latest times of " + key, "SELECT r.ts FROM reading r JOIN stream s ON s.id = r.stream "
                + "WHERE s.kind = ? AND s.key = ? AND r.ts >= ? AND r.ts < ? ORDER BY r.ts DESC LIMIT ?",
            ps -> {
                bindKey(ps, 1, key);
                ps.setLong(3, lo(from));
                ps.setLong(4, hi(to));
                ps.setInt(5, limit);
            },
            rs -> times[n[0]++] = rs.getLong(1));
        long[] out = new long[n[0]];
        for (int i = 0; i < n[0]; i++) out[i] = times[n[0] - 1 - i];
        return out;
    }

    /** Streams the raw readings of one stream in [from, to), oldest first, to {@code sink}. */
    public void forEachRaw(StreamKey key, Instant from, Instant to, Consumer<HistoryRow> sink) {
        rawRange(key, lo(from), hi(to), sink);
    }

    private void rawRange(StreamKey key, long lo, long hi, Consumer<HistoryRow> sink) {
        query("raw readings of " + key, "SELECT r.ts, r.value FROM reading r JOIN stream s ON s.id = r.stream "
                + "WHERE s.kind = ? AND s.key = ? AND r.ts >= ? AND r.ts < ? ORDER BY r.ts",
            ps -> {
                bindKey(ps, 1, key);
                ps.setLong(3, lo);
                ps.setLong(4, hi);
            },
            rs -> sink.accept(new HistoryRow(key, Instant.ofEpochMilli(rs.getLong(1)), rs.getDouble(2))));
    }

    /**
     * Streams the raw readings of several streams in [from, to) merged into one time order (ties by stream
     * order in {@code keys}), as replay needs them. Each stream is read by its own cursor, so no sort is needed.
     */
    public void forEachRawInTimeOrder(Collection<StreamKey> keys, Instant from, Instant to, Consumer<HistoryRow> sink) {
        record Cursor(int order, StreamKey key, PreparedStatement ps, ResultSet rs) {}
        PriorityQueue<Cursor> heap = new PriorityQueue<>(Comparator.<Cursor>comparingLong(c -> {
            try {
                return c.rs().getLong(1);
            } catch (SQLException e) {
                throw new HistoryException("history read failed: " + e.getMessage(), e);
            }
        }).thenComparingInt(Cursor::order));
        List<Cursor> all = new ArrayList<>();
        try {
            int order = 0;
            for (StreamKey key : keys) {
                PreparedStatement ps = conn.prepareStatement("SELECT r.ts, r.value FROM reading r JOIN stream s ON s.id = r.stream "
                    + "WHERE s.kind = ? AND s.key = ? AND r.ts >= ? AND r.ts < ? ORDER BY r.ts");
                bindKey(ps, 1, key);
                ps.setLong(3, lo(from));
                ps.setLong(4, hi(to));
                Cursor c = new Cursor(order++, key, ps, ps.executeQuery());
                all.add(c);
                if (c.rs().next()) heap.add(c);
            }
            while (!heap.isEmpty()) {
                Cursor c = heap.poll();
                sink.accept(new HistoryRow(c.key(), Instant.ofEpochMilli(c.rs().getLong(1)), c.rs().getDouble(2)));
                if (c.rs().next()) heap.add(c);
            }
        } catch (SQLException e) {
            throw new HistoryException("history read of " + keys.size() + " streams failed: " + e.getMessage(), e);
        } finally {
            for (Cursor c : all) {
                HistoryStore.closeQuietly(c.rs());
                HistoryStore.closeQuietly(c.ps());
            }
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
