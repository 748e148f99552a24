package byre.faults;

import byre.history.StoredReadings;
import java.nio.file.Path;
import java.sql.Connection;
import java.sql.DriverManager;
import java.sql.ResultSet;
import java.sql.SQLException;
import java.sql.Statement;
import java.util.HashSet;
import java.util.Set;

/** Configuration and database checks shared by the fault tests: a Larkmoor calf pen and cow shed. */
final class FaultRig {
    static final String[] SENSORS = {"pen1-dry", "pen1-rh", "pen1-air", "shed-dry", "shed-rh"};
    static final String[] TOPICS = {"larkmoor/calf-barn/pen1/dry", "larkmoor/calf-barn/pen1/rh", "larkmoor/calf-barn/pen1/air",
            "larkmoor/cow-shed/dry", "larkmoor/cow-shed/rh"};

    private FaultRig() {}

    /** Readings are JSON {@code {"v":..,"ts":<epoch ms>}}: the payload's own time keys the row, so each is distinct. */
    static String config(String brokerUri, String clientId, Path db) {
        return """
                site: larkmoor
                timezone: Europe/London
                mqtt:
                  broker: %s
                  client-id: %s
                sensors:
                  pen1-dry: { topic: larkmoor/calf-barn/pen1/dry, quantity: dry-bulb, payload: "json:v", time: "json:ts" }
                  pen1-rh:  { topic: larkmoor/calf-barn/pen1/rh, quantity: rh, unit: "%%", payload: "json:v", time: "json:ts" }
                  pen1-air: { topic: larkmoor/calf-barn/pen1/air, quantity: air-speed, payload: "json:v", time: "json:ts" }
                  shed-dry: { topic: larkmoor/cow-shed/dry, quantity: dry-bulb, payload: "json:v", time: "json:ts" }
                  shed-rh:  { topic: larkmoor/cow-shed/rh, quantity: rh, unit: "%%", payload: "json:v", time: "json:ts" }
                zones:
                  calf-pen-1: { groups: [calves], sensors: [pen1-dry, pen1-rh, pen1-air], elevation: 240 m }
                  cow-shed:   { groups: [cows], sensors: [shed-dry, shed-rh] }
                history:
                  path: %s
                """.formatted(brokerUri, clientId, db);
    }

    /** A plausible value for sensor {@code s}: dry bulb in C, RH in %, air speed in m/s. */
    static double value(int s, long n) {
        double wobble = Math.sin(n / 40.0);
        switch (s % 5) {
            case 0: return 18 + 2 * wobble;
            case 1: return 65 + 10 * wobble;
            case 2: return 0.8 + 0.3 * wobble;
            case 3: return 22 + 3 * wobble;
            default: return 70 + 8 * wobble;
        }
    }

    static String payload(int s, long n, long tsMs) {
        return String.format(java.util.Locale.ROOT, "{\"v\":%.2f,\"ts\":%d}", value(s, n), tsMs);
    }

    /** Every stored raw row as "sensor@ts". */
    static Set<String> sensorRows(Path db) throws SQLException {
        Set<String> out = new HashSet<>();
        for (StoredReadings.Row r : StoredReadings.all(db)) {
            if (r.kind().equals("sensor")) out.add(r.key() + "@" + r.tsMs());
        }
        return out;
    }

    static long number(Path db, String sql) throws SQLException {
        try (Connection c = DriverManager.getConnection("jdbc:sqlite:" + db);
             Statement st = c.createStatement();
             ResultSet rs = st.executeQuery(sql)) {
            return rs.next() ? rs.getLong(1) : -1;
        }
    }

    static String text(Path db, String sql) throws SQLException {
        try (Connection c = DriverManager.getConnection("jdbc:sqlite:" + db);
             Statement st = c.createStatement();
             ResultSet rs = st.executeQuery(sql)) {
            return rs.next() ? rs.getString(1) : null;
        }
    }
}
