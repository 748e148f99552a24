package byre.config;

import byre.units.Quantity;
import java.time.Duration;
import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.Set;

/**
 * A central byre: it reads other sites' zone streams, status and alert events (bridged to its broker) instead of
 * sensors. Each listed zone of a site becomes the central zone {@code <site>/<zone>}, taking the site's streams as
 * they are (the barn derived them; the centre derives nothing). Each site also gets a zone named after itself with
 * one stream, {@code online}: 1 while the site's byre is online and its bridge connected, 0 when not. With
 * {@code discover}, a site not listed joins once it publishes its status, with the zones, groups and max-age of
 * {@code defaults}.
 */
public record CentralSettings(Map<String, Site> sites, Defaults defaults, boolean discover) {
    /** The group every site's own zone belongs to: {@code @sites.online} is one alert per site. */
    public static final String SITES_GROUP = "sites";
    /** A site's values are fresh this long unless {@code max-age} says otherwise. */
    public static final Duration DEFAULT_MAX_AGE = Duration.ofMinutes(5);
    /** Sites taken from the broker at most (one instance's measured budget; beyond it, list sites or split). */
    public static final int MAX_FOUND_SITES = 1000;

    /** One site as listed under {@code central.sites}, or found on the broker ({@code line} 0). */
    public record Site(String id, List<String> zones, List<String> groups, Duration maxAge, int line) {}

    /** {@code central.defaults}: what a site gets where its entry says nothing, and all that a found site gets. */
    public record Defaults(List<String> zones, List<String> groups, Duration maxAge) {
        public static final Defaults NONE = new Defaults(List.of(), List.of(), DEFAULT_MAX_AGE);
    }

    public static final CentralSettings NONE = new CentralSettings(Map.of(), Defaults.NONE, false);

    public CentralSettings {
        sites = java.util.Collections.unmodifiableMap(new LinkedHashMap<>(sites));
    }

    public boolean enabled() {
        return !sites.isEmpty() || discover;
    }

    /** A site id (and a site's zone id) is one topic level: letters, digits, '-', '_' or '.'. */
    public static boolean isSiteId(String id) {
        return id != null && id.matches("[A-Za-z0-9][A-Za-z0-9_.-]*");
    }

    /** Why {@code id} cannot be a site of a central byre, or null when it can; a site found on the broker is checked the same way. */
    public static String siteIdProblem(String id, String ownSite, Map<String, ZoneConfig> zones) {
        if (!isSiteId(id)) return "site id '" + id + "' must be letters, digits, '-', '_' or '.' (it is a topic level of that site)";
        if (id.equals(ownSite)) return "site '" + id + "' is this byre's own site: the centre needs a site id of its own";
        if (zones.containsKey(id)) return "site '" + id + "' has the name of a zone of this configuration";
        return null;
    }

    /** The central zone id of a site's zone. */
    public static String zoneId(String site, String zone) {
        return site + "/" + zone;
    }

    /** The id of the sensor that carries a site's stream of {@code q} in the central zone {@code zoneId}: every value as the site sent it. */
    public static String mirrorSensor(String zoneId, Quantity q) {
        return zoneId + "/" + q.id();
    }

    /** The id of the sensor that carries a site's {@code online} stream. */
    public static String onlineSensor(String site) {
        return site + "/online";
    }

    /** True for a site's own zone (the one with the {@code online} stream). */
    public boolean isSiteZone(String zone) {
        return sites.containsKey(zone);
    }

    /** True for a zone that mirrors a site's zone ({@code <site>/<zone>}). */
    public boolean isMirroredZone(String zone) {
        int slash = zone.indexOf('/');
        if (slash <= 0) return false;
        Site s = sites.get(zone.substring(0, slash));
        return s != null && s.zones().contains(zone.substring(slash + 1));
    }

    /** The site ids: those listed, in the file's order, then those found. */
    public Set<String> siteIds() {
        return sites.keySet();
    }

    /** The site {@code id} as found on the broker: the defaults' zones, groups and max-age. */
    public Site found(String id) {
        return new Site(id, defaults.zones(), defaults.groups(), defaults.maxAge(), 0);
    }

    /** These settings with one more site. */
    public CentralSettings with(Site s) {
        Map<String, Site> more = new LinkedHashMap<>(sites);
        more.put(s.id(), s);
        return new CentralSettings(more, defaults, discover);
    }

    /**
     * Adds a site's sensors and zones: per zone, the central zone {@code <site>/<zone>} fed by one sensor per quantity
     * on the site's zone-stream topics ({@code <prefix>/<site>/zones/<zone>/<quantity>}, value and time from the JSON);
     * and the site's own zone {@code <site>} (group {@code sites}), whose {@code online} stream comes from its status.
     */
    public static void addSite(Site s, String prefix, Map<String, SensorConfig> sensors, Map<String, ZoneConfig> zones) {
        for (String z : s.zones()) {
            String zoneId = zoneId(s.id(), z);
            List<String> zoneSensors = new ArrayList<>();
            for (Quantity q : Quantity.values()) {
                if (q == Quantity.ONLINE) continue;
                String sensorId = mirrorSensor(zoneId, q);
                sensors.put(sensorId, new SensorConfig(sensorId, prefix + "/" + s.id() + "/zones/" + z + "/" + q.id(), q, q.canonicalUnit(),
                        new PayloadFormat(PayloadFormat.Kind.JSON, "value"), "at", 0, s.line()));
                zoneSensors.add(sensorId);
            }
            zones.put(zoneId, new ZoneConfig(zoneId, s.groups(), zoneSensors, Double.NaN, ZoneConfig.Psychrometer.ASPIRATED, s.maxAge(),
                    "nrc-1971", s.line()));
        }
        String online = onlineSensor(s.id());
        sensors.put(online, new SensorConfig(online, prefix + "/" + s.id() + "/status", Quantity.ONLINE,
                Quantity.ONLINE.canonicalUnit(), PayloadFormat.NUMBER, null, 0, s.line()));
        zones.put(s.id(), new ZoneConfig(s.id(), List.of(SITES_GROUP), List.of(online), Double.NaN,
                ZoneConfig.Psychrometer.ASPIRATED, s.maxAge(), "nrc-1971", s.line()));
    }
}
