package byre.history;

import java.nio.file.Path;
import java.sql.Connection;
import java.sql.DriverManager;
import java.sql.PreparedStatement;
import java.sql.ResultSet;
import java.sql.SQLException;
import java.util.ArrayList;
import java.util.HashSet;
import java.util.List;
import java.util.OptionalLong;
import java.util.Set;
import java.util.function.Predicate;

/**
 * Every raw reading a history file stores, from both of its tables: the rows of {@code reading} and the readings packed
 * in {@code reading_run}, as they are (nothing merged, nothing dropped), on a connection of its own like an outside
 * tool's. For tests that count what was stored, whichever table it is in by now.
 */
public final class StoredReadings {
    private StoredReadings() {}

    /** One stored reading; {@code packed} when it is in a run. */
    public record Row(String kind, String key, long tsMs, double value, boolean packed) {}

    /** Every stored raw reading, the rows of {@code reading} first, each table by stream and time. */
    public static List<Row> all(Path db) {
        List<Row> out = new ArrayList<>();
        try (Connection c = DriverManager.getConnection("jdbc:sqlite:" + db)) {
            try (PreparedStatement ps = c.prepareStatement(
                    "SELECT s.kind, s.key, r.ts, r.value FROM reading r JOIN stream s ON s.id = r.stream ORDER BY r.stream, r.ts");
                 ResultSet rs = ps.executeQuery()) {
                while (rs.next()) out.add(new Row(rs.getString(1), rs.getString(2), rs.getLong(3), rs.getDouble(4), false));
            }
            if (hasRuns(c)) {
                try (PreparedStatement ps = c.prepareStatement(
                        "SELECT s.kind, s.key, r.n, r.data FROM reading_run r JOIN stream s ON s.id = r.stream ORDER BY r.stream, r.ts");
                     ResultSet rs = ps.executeQuery()) {
                    while (rs.next()) {
                        RunCodec.Run run = RunCodec.decode(rs.getBytes(4));
                        if (run.size() != rs.getInt(3)) throw new AssertionError("run of " + rs.getString(2) + " says n = " + rs.getInt(3) + " but holds " + run.size());
                        for (int i = 0; i < run.size(); i++) out.add(new Row(rs.getString(1), rs.getString(2), run.tsMs()[i], run.values()[i], true));
                    }
                }
            }
        } catch (SQLException e) {
            throw new AssertionError("reading " + db + ": " + e.getMessage(), e);
        }
        return out;
    }

    /** How many raw readings are stored. */
    public static long count(Path db) {
        return all(db).size();
    }

    /** How many raw readings of the stream with this key (a sensor id or "zone.quantity") are stored. */
    public static long count(Path db, String key) {
        return count(db, r -> r.key().equals(key));
    }

    public static long count(Path db, Predicate<Row> which) {
        return all(db).stream().filter(which).count();
    }

    public static OptionalLong minTs(Path db) {
        return all(db).stream().mapToLong(Row::tsMs).min();
    }

    public static OptionalLong maxTs(Path db) {
        return all(db).stream().mapToLong(Row::tsMs).max();
    }

    /** Readings whose (stream, time) is stored more than once, in either table or across both. */
    public static long duplicates(Path db) {
        Set<String> seen = new HashSet<>();
        return all(db).stream().filter(r -> !seen.add(r.kind() + "/" + r.key() + "@" + r.tsMs())).count();
    }

    private static boolean hasRuns(Connection c) throws SQLException {
        try (PreparedStatement ps = c.prepareStatement("SELECT 1 FROM sqlite_schema WHERE type = 'table' AND name = 'reading_run'");
             ResultSet rs = ps.executeQuery()) {
            return rs.next();
        }
    }
}
