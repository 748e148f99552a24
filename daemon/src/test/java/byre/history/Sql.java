package byre.history;

import java.nio.file.Path;
import java.sql.Connection;
import java.sql.DriverManager;
import java.sql.ResultSet;
import java.sql.SQLException;
import java.sql.Statement;

/** Plain JDBC look-ups for assertions, on a separate connection like an outside tool would use. */
final class Sql {
    private Sql() {}

    static String text(Path db, String sql) {
        try (Connection c = DriverManager.getConnection("jdbc:sqlite:" + db);
             Statement st = c.createStatement();
             ResultSet rs = st.executeQuery(sql)) {
            return rs.next() ? rs.getString(1) : null;
        } catch (SQLException e) {
            throw new AssertionError(sql + ": " + e.getMessage(), e);
        }
    }

    static long number(Path db, String sql) {
        return Long.parseLong(text(db, sql));
    }

    static void exec(Path db, String sql) {
        try (Connection c = DriverManager.getConnection("jdbc:sqlite:" + db); Statement st = c.createStatement()) {
            st.execute(sql);
        } catch (SQLException e) {
            throw new AssertionError(sql + ": " + e.getMessage(), e);
        }
    }
}
