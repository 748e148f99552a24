package byre.history;

import java.sql.Connection;
import java.sql.SQLException;
import java.sql.Statement;

/**
 * Explicit transactions for the writer's connection, which stays in JDBC auto-commit mode. sqlite-jdbc with
 * auto-commit off opens the next transaction right after each commit; with IMMEDIATE that would hold the
 * write lock while the writer is idle and block {@link HistoryStore#putState} from other connections.
 */
final class WriterTx {
    private WriterTx() {}

    /** Takes the write lock now, so the transaction never has to upgrade from read to write later. */
    static void begin(Connection conn) throws SQLException {
        exec(conn, "BEGIN IMMEDIATE");
    }

    static void commit(Connection conn) throws SQLException {
        exec(conn, "COMMIT");
    }

    /** Copies what it can of the write-ahead log into the file without waiting for other connections. */
    static void checkpointPassive(Connection conn) throws SQLException {
        exec(conn, "PRAGMA wal_checkpoint(PASSIVE)");
    }

    static void rollbackQuietly(Connection conn) {
        try {
            exec(conn, "ROLLBACK");
        } catch (SQLException ignored) {
            // SQLite may already have rolled back (e.g. after SQLITE_FULL); nothing is left open then
        }
    }

    private static void exec(Connection conn, String sql) throws SQLException {
        try (Statement st = conn.createStatement()) {
            st.execute(sql);
        }
    }
}
