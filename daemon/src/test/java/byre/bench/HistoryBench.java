package byre.bench;

import byre.history.HistoryStore;
import byre.history.HistoryWriter;
import byre.history.WriterSettings;
import byre.history.Retention;
import byre.history.StreamKey;
import java.io.IOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.sql.Connection;
import java.sql.DriverManager;
import java.sql.PreparedStatement;
import java.sql.SQLException;
import java.sql.Statement;
import java.time.Clock;
import java.time.Instant;
import java.time.ZoneOffset;
import java.util.Comparator;
import java.util.stream.Stream;

/**
 * Throughput of {@link HistoryWriter} (queue, batches of up to 10,000 sorted by stream, WITHOUT ROWID raw table, minute and hour
 * rollups) against bare JDBC batch inserts of the same rows in the same process: into a plain rowid table
 * (the baseline) and into the same WITHOUT ROWID layout without rollups. Same pragmas everywhere (WAL,
 * synchronous=NORMAL), the writer's batch size per transaction.
 *
 * <p>Run: {@code mvn -q -B -o -pl daemon -am test-compile} then
 * {@code java -cp "daemon/target/classes:daemon/target/test-classes:rules/target/classes:<sqlite-jdbc, slf4j-api,
 * logback-classic, logback-core jars>" byre.bench.HistoryBench [rows=1000000] [streams=50] [rounds=4]}.
 */
public final class HistoryBench {

    private static final long T0 = Instant.parse("2025-07-14T00:00:00Z").toEpochMilli();

    public static void main(String[] args) throws Exception {
        int rows = args.length > 0 ? Integer.parseInt(args[0]) : 1_000_000;
        int streams = args.length > 1 ? Integer.parseInt(args[1]) : 50;
        int rounds = args.length > 2 ? Integer.parseInt(args[2]) : 4;
        Path dir = Files.createTempDirectory("byre-history-bench");
        try {
            System.out.printf("rows=%d streams=%d rounds=%d (first round is warm-up and not counted)%n", rows, streams, rounds);
            double[] writer = new double[rounds];
            double[] plain = new double[rounds];
            double[] keyed = new double[rounds];
            double writerBytes = 0;
            double plainBytes = 0;
            double keyedBytes = 0;
            for (int r = 0; r < rounds; r++) {
                int n = r == 0 ? Math.min(rows, 100_000) : rows;
                Result w = viaWriter(dir.resolve("writer" + r + ".db"), n, streams);
                Result p = bareJdbc(dir.resolve("plain" + r + ".db"), n, streams, false);
                Result k = bareJdbc(dir.resolve("keyed" + r + ".db"), n, streams, true);
                writer[r] = w.rowsPerSecond;
                plain[r] = p.rowsPerSecond;
                keyed[r] = k.rowsPerSecond;
                writerBytes = w.bytesPerRow;
                plainBytes = p.bytesPerRow;
                keyedBytes = k.bytesPerRow;
                System.out.printf("round %d: HistoryWriter %,.0f rows/s, bare JDBC plain table %,.0f rows/s, bare JDBC WITHOUT ROWID %,.0f rows/s%n",
                    r, w.rowsPerSecond, p.rowsPerSecond, k.rowsPerSecond);
            }
            double mw = median(writer, rounds);
            double mp = median(plain, rounds);
            double mk = median(keyed, rounds);
            System.out.printf("median HistoryWriter:           %,10.0f rows/s, %.1f bytes/reading on disk (raw + minute + hour rollups)%n", mw, writerBytes);
            System.out.printf("median bare JDBC, plain table:  %,10.0f rows/s, %.1f bytes/row (baseline)%n", mp, plainBytes);
            System.out.printf("median bare JDBC, WITHOUT ROWID:%,10.0f rows/s, %.1f bytes/row%n", mk, keyedBytes);
            System.out.printf("ratio HistoryWriter / plain baseline = %.2f; HistoryWriter / WITHOUT ROWID = %.2f%n", mw / mp, mw / mk);
        } finally {
            try (Stream<Path> s = Files.walk(dir)) {
                s.sorted(Comparator.reverseOrder()).forEach(p -> p.toFile().delete());
            }
        }
    }

    private record Result(double rowsPerSecond, double bytesPerRow) {}

    private static double median(double[] values, int rounds) {
        double[] counted = java.util.Arrays.copyOfRange(values, rounds > 1 ? 1 : 0, rounds);
        java.util.Arrays.sort(counted);
        int m = counted.length / 2;
        return counted.length % 2 == 1 ? counted[m] : (counted[m - 1] + counted[m]) / 2;
    }

    private static double value(int i) {
        return Math.round((12 + (i * 7919 % 800) / 100.0) * 100) / 100.0;
    }

    private static long ts(int i, int streams) {
        return T0 + (long) (i / streams) * 10_000L + (i % streams) * 37L;
    }

    private static Result viaWriter(Path db, int rows, int streams) {
        Clock clock = Clock.fixed(Instant.ofEpochMilli(ts(rows, streams)), ZoneOffset.UTC);
        StreamKey[] keys = new StreamKey[streams];
        for (int s = 0; s < streams; s++) keys[s] = StreamKey.sensor("bench-" + s);
        long t0;
        long t1;
        try (HistoryStore store = HistoryStore.open(db, clock)) {
            try (HistoryWriter w = HistoryWriter.start(store, Retention.DEFAULT, clock)) {
                t0 = System.nanoTime();
                for (int i = 0; i < rows; i++) {
                    if (!w.append(keys[i % streams], ts(i, streams), value(i))) throw new IllegalStateException("row " + i + " not queued");
                }
                if (!w.flush()) throw new IllegalStateException("flush timed out");
                t1 = System.nanoTime();
                if (w.stats().rowsWritten() != rows) throw new IllegalStateException("wrote " + w.stats().rowsWritten() + " of " + rows);
            }
            store.checkpoint();
        }
        return new Result(rows / ((t1 - t0) / 1e9), size(db) / (double) rows);
    }

    private static Result bareJdbc(Path db, int rows, int streams, boolean withoutRowid) throws SQLException {
        long t0;
        long t1;
        try (Connection c = DriverManager.getConnection("jdbc:sqlite:" + db)) {
            try (Statement st = c.createStatement()) {
                st.execute("PRAGMA journal_mode=WAL");
                st.execute("PRAGMA synchronous=NORMAL");
                st.execute(withoutRowid
                    ? "CREATE TABLE reading (stream INTEGER NOT NULL, ts INTEGER NOT NULL, value REAL NOT NULL, PRIMARY KEY (stream, ts)) WITHOUT ROWID"
                    : "CREATE TABLE reading (stream INTEGER NOT NULL, ts INTEGER NOT NULL, value REAL NOT NULL)");
            }
            c.setAutoCommit(false);
            t0 = System.nanoTime();
            try (PreparedStatement ps = c.prepareStatement("INSERT INTO reading(stream, ts, value) VALUES (?, ?, ?)")) {
                for (int i = 0; i < rows; i++) {
                    ps.setInt(1, i % streams);
                    ps.setLong(2, ts(i, streams));
                    ps.setDouble(3, value(i));
                    ps.addBatch();
                    if ((i + 1) % WriterSettings.DEFAULT.batchRows() == 0) {
                        ps.executeBatch();
                        c.commit();
                    }
                }
                ps.executeBatch();
                c.commit();
            }
            t1 = System.nanoTime();
            c.setAutoCommit(true);
            try (Statement st = c.createStatement()) {
                st.execute("PRAGMA wal_checkpoint(TRUNCATE)");
            }
        }
        return new Result(rows / ((t1 - t0) / 1e9), size(db) / (double) rows);
    }

    private static long size(Path db) {
        try {
            return Files.size(db) + (Files.exists(Path.of(db + "-wal")) ? Files.size(Path.of(db + "-wal")) : 0);
        } catch (IOException e) {
            throw new IllegalStateException(e);
        }
    }
}
