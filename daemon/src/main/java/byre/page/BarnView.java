package byre.page;

import byre.alerts.OpenIncident;
import byre.units.Quantity;
import java.time.Duration;
import java.time.Instant;
import java.util.List;
import java.util.Map;

/**
 * Everything the barn page shows, gathered first so that drawing it is a pure function of this and the time.
 * {@code state} is set on a central byre's page of one site (its link, and the way back to the list); null on a barn.
 */
record BarnView(List<Zone> zones, List<OpenIncident> alerts, List<Silent> silent, String problem, SiteState state) {

    /** A barn's own page. */
    BarnView(List<Zone> zones, List<OpenIncident> alerts, List<Silent> silent, String problem) {
        this(zones, alerts, silent, problem, null);
    }

    /** A value in canonical units and when it was measured. */
    record Value(double value, Instant at) {}

    /**
     * One zone: newest value per quantity, and per trend quantity the means of the 15-minute buckets of the last
     * 24 hours (NaN where nothing was stored), oldest first.
     */
    record Zone(String id, List<String> groups, Duration maxAge, Map<Quantity, Value> values, Map<Quantity, double[]> trends) {}

    /** A configured sensor with no reading within its zone's max-age; {@code lastAt} null if it never reported. */
    record Silent(String sensor, String zone, Instant lastAt) {}

    /**
     * What a central byre knows of a site's link: {@code online} true or false as its status and bridge say (null
     * before either said anything), {@code lastHeard} when its newest message arrived (null if none yet); {@code self}
     * for the central byre's own zones, which have no link.
     */
    record SiteState(Boolean online, Instant lastHeard, boolean self) {
        static final SiteState SELF = new SiteState(true, null, true);

        static SiteState of(Boolean online, Instant lastHeard) {
            return new SiteState(online, lastHeard, false);
        }
    }
}
