package byre.config;

import java.time.Duration;
import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.Set;
import org.snakeyaml.engine.v2.nodes.Node;

/**
 * Reads and checks {@code central: { sites: { larkmoor: { zones: [cow-shed], groups: [dairy] } } }}: each listed zone
 * becomes the zone {@code <site>/<zone>}, fed by one sensor per quantity on the site's zone-stream topics; each site
 * also gets the zone {@code <site>} (group {@code sites}) whose {@code online} stream comes from its status and bridge
 * topics. Added to {@code sensors} and {@code zones}, so the rules, the history and {@code byre status} see them like
 * any other. {@code defaults} fills what a site's entry leaves out; {@code discover: true} also takes in the sites
 * found on the broker, each with the defaults.
 */
final class CentralSection {
    static final Set<String> KEYS = NodeReader.ordered("sites", "discover", "defaults");
    static final Set<String> SITE_KEYS = NodeReader.ordered("zones", "groups", "max-age");

    private CentralSection() {}

    static CentralSettings read(NodeReader r, Node node, String ownSite, MqttSettings mqtt, Map<String, SensorConfig> sensors,
                                Map<String, ZoneConfig> zones) {
        if (node == null) return CentralSettings.NONE;
        Map<String, Node> c = r.mapping(node, KEYS, "central");
        boolean discover = r.bool(c.get("discover"), "central.discover", false);
        CentralSettings.Defaults defaults = CentralSettings.Defaults.NONE;
        if (c.get("defaults") != null) {
            Map<String, Node> d = r.mapping(c.get("defaults"), SITE_KEYS, "central.defaults");
            defaults = new CentralSettings.Defaults(zoneIds(r, d.get("zones"), "central.defaults"), groups(r, d.get("groups")),
                    r.duration(d.get("max-age"), "max-age", CentralSettings.DEFAULT_MAX_AGE));
        }
        if (c.get("sites") == null && !discover) {
            r.problem(node, "central: lists no sites and does not discover them (sites: { larkmoor: { zones: [cow-shed] } }, or discover: true)");
            return CentralSettings.NONE;
        }
        Map<String, CentralSettings.Site> sites = new LinkedHashMap<>();
        Map<String, Node> listed = c.get("sites") == null ? Map.of() : r.mapping(c.get("sites"), null, "central.sites");
        for (Map.Entry<String, Node> e : listed.entrySet()) {
            String id = e.getKey();
            Node n = e.getValue();
            String bad = CentralSettings.siteIdProblem(id, ownSite, zones);
            if (bad != null) {
                r.problem(r.keyOf(n), bad);
                if (!CentralSettings.isSiteId(id)) continue;
            }
            Map<String, Node> f = r.mapping(n, SITE_KEYS, "site " + id);
            List<String> siteZones = f.get("zones") == null ? defaults.zones() : zoneIds(r, f.get("zones"), "site " + id);
            if (siteZones.isEmpty()) r.problem(n, "site " + id + " lists no zones (zones: [cow-shed, calf-pen-1]), and central.defaults gives none");
            List<String> groups = f.get("groups") == null ? defaults.groups() : groups(r, f.get("groups"));
            Duration maxAge = r.duration(f.get("max-age"), "max-age", defaults.maxAge());
            CentralSettings.Site site = new CentralSettings.Site(id, siteZones, groups, maxAge, NodeReader.line(n));
            CentralSettings.addSite(site, mqtt.publishPrefix(), sensors, zones);
            sites.put(id, site);
        }
        return new CentralSettings(sites, defaults, discover);
    }

    private static List<String> zoneIds(NodeReader r, Node node, String whose) {
        List<String> out = new ArrayList<>();
        for (NodeReader.Item item : r.items(node, "zones")) {
            String z = item.value();
            if (!CentralSettings.isSiteId(z)) {
                r.problem(item.node(), "zone id '" + z + "' must be letters, digits, '-', '_' or '.'");
            } else if (out.contains(z)) {
                r.problem(item.node(), whose + " lists zone " + z + " twice");
            } else {
                out.add(z);
            }
        }
        return out;
    }

    private static List<String> groups(NodeReader r, Node node) {
        List<String> groups = new ArrayList<>();
        for (NodeReader.Item g : r.items(node, "groups")) {
            groups.add(g.value());
            if (g.value().equals(CentralSettings.SITES_GROUP)) {
                r.problem(g.node(), "group '" + CentralSettings.SITES_GROUP + "' is every site's own zone (its online stream); choose another name");
            }
        }
        return groups;
    }
}
