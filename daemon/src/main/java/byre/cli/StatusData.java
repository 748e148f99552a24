package byre.cli;

import byre.admin.OpenAlert;
import byre.units.Quantity;
import java.time.Instant;
import java.util.List;
import java.util.Map;

/** Everything {@code byre status} shows, gathered before rendering so that rendering is a pure function. */
record StatusData(Daemon daemon, List<Zone> zones, List<OpenAlert> alerts, String alertsFrom, List<Silent> silent) {

    /** The daemon as seen through its admin API; {@code reachable} false when it did not answer. */
    record Daemon(boolean reachable, boolean healthy, List<String> problems) {
        static final Daemon UNREACHABLE = new Daemon(false, false, List.of());
    }

    /** A value and when it was measured. */
    record Value(double value, Instant at) {}

    /** One zone: newest values per quantity (canonical units) and hourly means of the last 24 h for the key indices. */
    record Zone(String id, List<String> groups, java.time.Duration maxAge, Map<Quantity, Value> values, Map<Quantity, double[]> trends) {}

    /** A configured sensor with no reading within its zone's max-age; {@code lastAt} null if it never reported. */
    record Silent(String sensor, String zone, Instant lastAt) {}
}
