package byre.config;

import java.time.Duration;
import java.util.List;
import java.util.Map;
import java.util.Set;

/**
 * A central byre: it reads other sites' zone streams, status and alert events (bridged to its broker) instead of
 * sensors. Each listed zone of a site becomes the central zone {@code <site>/<zone>}, taking the site's streams as
 * they are (the barn derived them; the centre derives nothing). Each site also gets a zone named after itself with
 * one stream, {@code online}: 1 while the site's byre is online and its bridge connected, 0 when not.
 */
public record CentralSettings(Map<String, Site> sites) {
    /** The group every site's own zone belongs to: {@code @sites.online} is one alert per site. */
    public static final String SITES_GROUP = "sites";

    /** One site as listed under {@code central.sites}. */
    public record Site(String id, List<String> zones, List<String> groups, Duration maxAge, int line) {}

    public static final CentralSettings NONE = new CentralSettings(Map.of());

    public boolean enabled() {
        return !sites.isEmpty();
    }

    /** The central zone id of a site's zone. */
    public static String zoneId(String site, String zone) {
        return site + "/" + zone;
    }

    /** The id of the sensor that carries a site's stream of {@code q} in the central zone {@code zoneId}: every value as the site sent it. */
    public static String mirrorSensor(String zoneId, byre.units.Quantity q) {
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

    /** The site ids in the file's order. */
    public Set<String> siteIds() {
        return sites.keySet();
    }
}
