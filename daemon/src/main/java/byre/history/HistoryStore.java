package byre.history;

import java.io.IOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.sql.Connection;
import java.sql.PreparedStatement;
import java.sql.ResultSet;
import java.sql.SQLException;
import java.sql.Statement;
import java.time.Clock;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import org.sqlite.SQLiteConfig;

/**
 * The history database file: opens or creates it, brings its schema up to date, and keeps the durable
 * key/value {@code state} table. Writing readings is {@link HistoryWriter}'s job, reading them
 * {@link HistoryReader}'s; each has its own connection, so queries are safe while the daemon writes.
 *
 * <p>Every connection uses WAL (readers never block the writer) and {@code synchronous=NORMAL} (a commit
 * costs no fsync; a power cut may lose the last commits but never corrupts the file). The state connection
 * alone uses {@code synchronous=FULL}, because alert state must be on disk before {@link #putState} returns.
 */
public final class HistoryStore implements AutoCloseable {

    static final int BUSY_TIMEOUT_MS = 5_000;
    /** Write-ahead log pages (4 KiB) before a checkpoint: 16 MiB, against SQLite's default of 1000 pages. */
    static final int WAL_CHECKPOINT_PAGES = 4000;

    private final Path file;
    private final Clock clock;
    private final Connection stateConn;
    private final int schemaVersion;
    private final WriteTurn writeTurn = new WriteTurn();

    private HistoryStore(Path file, Clock clock, Connection stateConn, int schemaVersion) {
        this.file = file;
        this.clock = clock;
        this.stateConn = stateConn;
        this.schemaVersion = schemaVersion;
    }

    /** Opens (creating if needed) the history at {@code file} with the system clock. */
    public static HistoryStore open(Path file) {
        return open(file, Clock.systemUTC());
    }

    /**
     * Opens (creating the file and its folder if needed) and migrates the history at {@code file}.
     * The clock stamps {@code state.updated}.
     *
     * @throws HistoryException with a message naming the file when it cannot be used: a folder that cannot be
     *     created, a file that is not SQLite or not a byre history, or a schema newer than this byre knows.
     */
    public static HistoryStore open(Path file, Clock clock) {
        return open(file, clock, Migrations.ALL);
    }

    static HistoryStore open(Path file, Clock clock, List<Migration> migrations) {
        Path abs = file.toAbsolutePath();
        try {
            Path parent = abs.getParent();
            if (parent != null) Files.createDirectories(parent);
        } catch (IOException e) {
            throw new HistoryException("history " + abs + ": cannot create its folder: " + e.getMessage(), e);
        }
        Connection conn = null;
        try {
            conn = connect(abs, false, true);
            int version = migrate(conn, abs, migrations);
            return new HistoryStore(abs, clock, conn, version);
        } catch (SQLException e) {
            closeQuietly(conn);
            throw new HistoryException("history " + abs + ": cannot open: " + e.getMessage(), e);
        } catch (RuntimeException e) {
            closeQuietly(conn);
            throw e;
        }
    }

    /** Where a connection that must not wait long for the write lock asks the history writer to let it go first. */
    public WriteTurn writeTurn() { return writeTurn; }

    /** The database file (absolute). */
    public Path path() { return file; }

    /** The schema version of the file (its {@code PRAGMA user_version}) after migration. */
    public int schemaVersion() { return schemaVersion; }

    /** The newest schema version this build knows. */
    public static int latestSchemaVersion() { return Migrations.latestVersion(); }

    /** Size on disk of the database file plus its write-ahead log, in bytes. */
    public long sizeOnDiskBytes() {
        return sizeOf(file) + sizeOf(Path.of(file + "-wal"));
    }

    private static long sizeOf(Path p) {
        try {
            return Files.exists(p) ? Files.size(p) : 0L;
        } catch (IOException e) {
            return 0L;
        }
    }

    /** A new read-only connection for queries; close it when done. Not for use by several threads at once. */
    public HistoryReader openReader() {
        try {
            return new HistoryReader(connect(file, true, false));
        } catch (SQLException e) {
            throw new HistoryException("history " + file + ": cannot open for reading: " + e.getMessage(), e);
        }
    }

    /**
     * Stores {@code value} under {@code key}, committed and synced to disk before this returns.
     *
     * @throws HistoryException when the value could not be stored (disk full, read-only file): the caller must
     *     know that the state is not durable.
     */
    public void putState(String key, String value) {
        if (key == null || key.isEmpty()) throw new IllegalArgumentException("state key must not be empty");
        if (value == null) throw new IllegalArgumentException("state value for '" + key + "' must not be null (use deleteState)");
        synchronized (stateConn) {
            try {
                writeState(stateConn, key, value, clock.millis());
            } catch (SQLException e) {
                throw new HistoryException("history " + file + ": cannot save state '" + key + "': " + e.getMessage(), e);
            }
        }
    }

    /**
     * Stores {@code value} under {@code key} on {@code conn}, a connection to a history file, inside the caller's
     * transaction if one is open: the alert outbox commits the incident state together with the events it caused.
     */
    public static void writeState(Connection conn, String key, String value, long updatedMs) throws SQLException {
        try (PreparedStatement ps = conn.prepareStatement(
                "INSERT INTO state(key, value, updated) VALUES (?, ?, ?) "
                + "ON CONFLICT(key) DO UPDATE SET value = excluded.value, updated = excluded.updated")) {
            ps.setString(1, key);
            ps.setString(2, value);
            ps.setLong(3, updatedMs);
            ps.executeUpdate();
        }
    }

    /** Removes {@code key} from the state table, durably; no effect when absent. */
    public void deleteState(String key) {
        synchronized (stateConn) {
            try (PreparedStatement ps = stateConn.prepareStatement("DELETE FROM state WHERE key = ?")) {
                ps.setString(1, key);
                ps.executeUpdate();
            } catch (SQLException e) {
                throw new HistoryException("history " + file + ": cannot delete state '" + key + "': " + e.getMessage(), e);
            }
        }
    }

    /** Every state entry whose key starts with {@code prefix} ("" for all), ordered by key. */
    public Map<String, String> loadState(String prefix) {
        String p = prefix == null ? "" : prefix;
        Map<String, String> out = new LinkedHashMap<>();
        synchronized (stateConn) {
            try (PreparedStatement ps = stateConn.prepareStatement(
                    "SELECT key, value FROM state WHERE substr(key, 1, ?) = ? ORDER BY key")) {
                ps.setInt(1, p.length());
                ps.setString(2, p);
                try (ResultSet rs = ps.executeQuery()) {
                    while (rs.next()) out.put(rs.getString(1), rs.getString(2));
                }
            } catch (SQLException e) {
                throw new HistoryException("history " + file + ": cannot load state '" + p + "*': " + e.getMessage(), e);
            }
        }
        return out;
    }

    /** Checkpoints the write-ahead log into the main file (TRUNCATE mode), e.g. before measuring its size. */
    public void checkpoint() {
        synchronized (stateConn) {
            try (Statement st = stateConn.createStatement()) {
                st.execute("PRAGMA wal_checkpoint(TRUNCATE)");
            } catch (SQLException e) {
                throw new HistoryException("history " + file + ": checkpoint failed: " + e.getMessage(), e);
            }
        }
    }

    @Override
    public void close() {
        synchronized (stateConn) {
            closeQuietly(stateConn);
        }
    }

    /**
     * A new read-write connection with {@code synchronous=FULL}, for a stage that keeps its own tables in this file
     * (the alert outbox): a commit is on disk when it returns. The caller owns and closes it.
     */
    public Connection openSyncedConnection() {
        try {
            return connect(file, false, true);
        } catch (SQLException e) {
            throw new HistoryException("history " + file + ": cannot open: " + e.getMessage(), e);
        }
    }

    /** A connection for the writer thread (synchronous=NORMAL); it opens its own transactions with {@link WriterTx}. */
    Connection openWriterConnection() throws SQLException {
        return connect(file, false, false);
    }

    static Connection connect(Path file, boolean readOnly, boolean syncFull) throws SQLException {
        SqliteNative.prepare(file.toAbsolutePath().getParent());
        SQLiteConfig cfg = new SQLiteConfig();
        cfg.setJournalMode(SQLiteConfig.JournalMode.WAL);
        cfg.setSynchronous(syncFull ? SQLiteConfig.SynchronousMode.FULL : SQLiteConfig.SynchronousMode.NORMAL);
        cfg.setBusyTimeout(BUSY_TIMEOUT_MS);
        // byre never asks for generated keys; with them on, the driver runs a regular expression over the
        // SQL of every update to find out whether it was an INSERT (a measurable share of the writer's time).
        cfg.setGetGeneratedKeys(false);
        if (readOnly) cfg.setReadOnly(true);
        Connection conn = cfg.createConnection("jdbc:sqlite:" + file);
        if (!readOnly) {
            // Every page a checkpoint copies is written twice (log, then file); copying less often writes each hot
            // page (a stream's newest) once for more commits. Set on every writing connection: whichever commits
            // past the limit runs the checkpoint. The alert outbox turns it off on its own (the writer checkpoints for it).
            try (Statement st = conn.createStatement()) {
                st.execute("PRAGMA wal_autocheckpoint = " + WAL_CHECKPOINT_PAGES);
            }
        }
        return conn;
    }

    private static int migrate(Connection conn, Path file, List<Migration> migrations) throws SQLException {
        checkMigrationList(migrations);
        int known = migrations.isEmpty() ? 0 : migrations.get(migrations.size() - 1).version();
        try (Statement st = conn.createStatement()) {
            // BEGIN IMMEDIATE: a second process opening the same file at the same moment waits, then sees
            // the version the first one wrote.
            st.execute("BEGIN IMMEDIATE");
            try {
                int version = intPragma(st, "user_version");
                int appId = intPragma(st, "application_id");
                checkOurs(st, file, version, appId, known);
                for (Migration m : migrations) {
                    if (m.version() <= version) continue;
                    for (String sql : m.statements()) st.execute(sql);
                    st.execute("PRAGMA user_version = " + m.version());
                    version = m.version();
                }
                st.execute("COMMIT");
                return version;
            } catch (SQLException | RuntimeException e) {
                try {
                    st.execute("ROLLBACK");
                } catch (SQLException ignored) {
                    // the failure itself is what the operator needs to see
                }
                throw e;
            }
        }
    }

    private static void checkOurs(Statement st, Path file, int version, int appId, int known) throws SQLException {
        if (appId != 0 && appId != Migrations.APPLICATION_ID) {
            throw new HistoryException("history " + file + " is an SQLite file of another program (application_id "
                + appId + "), not a byre history; point history.path at a new file");
        }
        if (version == 0 && appId == 0) {
            try (ResultSet rs = st.executeQuery("SELECT count(*) FROM sqlite_schema")) {
                if (rs.next() && rs.getInt(1) > 0) {
                    throw new HistoryException("history " + file + " already holds tables that are not a byre history;"
                        + " point history.path at a new file");
                }
            }
        }
        if (version > known) {
            throw new HistoryException("history " + file + " has schema version " + version + " but this byre knows only up to "
                + known + "; it was written by a newer byre. Upgrade byre, or move the file aside to start a new history.");
        }
    }

    static void checkMigrationList(List<Migration> migrations) {
        for (int i = 0; i < migrations.size(); i++) {
            if (migrations.get(i).version() != i + 1) {
                throw new IllegalStateException("history migrations must be numbered 1, 2, 3... in order; entry " + i
                    + " has version " + migrations.get(i).version());
            }
        }
    }

    private static int intPragma(Statement st, String name) throws SQLException {
        try (ResultSet rs = st.executeQuery("PRAGMA " + name)) {
            return rs.next() ? rs.getInt(1) : 0;
        }
    }

    static void closeQuietly(AutoCloseable c) {
        if (c == null) return;
        try {
            c.close();
        } catch (Exception ignored) {
            // closing is best effort
        }
    }
}
