package byre.page;

import byre.alerts.OpenIncident;
import byre.units.Quantity;
import java.time.Duration;
import java.time.Instant;
import java.util.List;
import java.util.Map;

/** Everything the barn page shows, gathered first so that drawing it is a pure function of this and the time. */
record BarnView(List<Zone> zones, List<OpenIncident> alerts, List<Silent> silent, String problem) {

    /** A value in canonical units and when it was measured. */
    record Value(double value, Instant at) {}

    /**
     * One zone: newest value per quantity, and per trend quantity the means of the 15-minute buckets of the last
     * 24 hours (NaN where nothing was stored), oldest first.
     */
    record Zone(String id, List<String> groups, Duration maxAge, Map<Quantity, Value> values, Map<Quantity, double[]> trends) {}

    /** A configured sensor with no reading within its zone's max-age; {@code lastAt} null if it never reported. */
    record Silent(String sensor, String zone, Instant lastAt) {}
}
