package byre.config;

import byre.units.Quantity;
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
 * any other.
 */
final class CentralSection {
    static final Set<String> KEYS = NodeReader.ordered("sites");
    static final Set<String> SITE_KEYS = NodeReader.ordered("zones", "groups", "max-age");

    private CentralSection() {}

    static CentralSettings read(NodeReader r, Node node, String ownSite, MqttSettings mqtt, Map<String, SensorConfig> sensors,
                                Map<String, ZoneConfig> zones) {
        if (node == null) return CentralSettings.NONE;
        Map<String, Node> c = r.mapping(node, KEYS, "central");
        if (c.get("sites") == null) {
            r.problem(node, "central: lists no sites (sites: { larkmoor: { zones: [cow-shed] } })");
            return CentralSettings.NONE;
        }
        Map<String, CentralSettings.Site> sites = new LinkedHashMap<>();
        for (Map.Entry<String, Node> e : r.mapping(c.get("sites"), null, "central.sites").entrySet()) {
            String id = e.getKey();
            Node n = e.getValue();
            if (!id.matches("[A-Za-z0-9][A-Za-z0-9_.-]*")) {
                r.problem(r.keyOf(n), "site id '" + id + "' must be letters, digits, '-', '_' or '.' (it is a topic level of that site)");
                continue;
            }
            if (id.equals(ownSite)) r.problem(r.keyOf(n), "site '" + id + "' is this byre's own site: the centre needs a site id of its own");
            if (zones.containsKey(id)) r.problem(r.keyOf(n), "site '" + id + "' has the name of a zone of this configuration");
            Map<String, Node> f = r.mapping(n, SITE_KEYS, "site " + id);
            List<NodeReader.Item> zoneItems = r.items(f.get("zones"), "zones");
            List<String> siteZones = zoneItems.stream().map(NodeReader.Item::value).toList();
            if (siteZones.isEmpty()) r.problem(n, "site " + id + " lists no zones (zones: [cow-shed, calf-pen-1])");
            List<String> groups = new ArrayList<>();
            for (NodeReader.Item g : r.items(f.get("groups"), "groups")) {
                groups.add(g.value());
                if (g.value().equals(CentralSettings.SITES_GROUP)) {
                    r.problem(g.node(), "group '" + CentralSettings.SITES_GROUP + "' is every site's own zone (its online stream); choose another name");
                }
            }
            Duration maxAge = r.duration(f.get("max-age"), "max-age", Duration.ofMinutes(5));
            int line = NodeReader.line(n);
            for (NodeReader.Item item : zoneItems) {
                String z = item.value();
                if (!z.matches("[A-Za-z0-9][A-Za-z0-9_.-]*")) {
                    r.problem(item.node(), "zone id '" + z + "' must be letters, digits, '-', '_' or '.'");
                    continue;
                }
                String zoneId = CentralSettings.zoneId(id, z);
                if (zones.containsKey(zoneId)) {
                    r.problem(item.node(), "site " + id + " lists zone " + z + " twice");
                    continue;
                }
                List<String> zoneSensors = new ArrayList<>();
                for (Quantity q : Quantity.values()) {
                    if (q == Quantity.ONLINE) continue;
                    String sensorId = CentralSettings.mirrorSensor(zoneId, q);
                    String topic = mqtt.publishPrefix() + "/" + id + "/zones/" + z + "/" + q.id();
                    sensors.put(sensorId, new SensorConfig(sensorId, topic, q, q.canonicalUnit(),
                            new PayloadFormat(PayloadFormat.Kind.JSON, "value"), "at", 0, line));
                    zoneSensors.add(sensorId);
                }
                zones.put(zoneId, new ZoneConfig(zoneId, groups, zoneSensors, Double.NaN, ZoneConfig.Psychrometer.ASPIRATED, maxAge,
                        "nrc-1971", line));
            }
            String online = CentralSettings.onlineSensor(id);
            sensors.put(online, new SensorConfig(online, mqtt.publishPrefix() + "/" + id + "/status", Quantity.ONLINE,
                    Quantity.ONLINE.canonicalUnit(), PayloadFormat.NUMBER, null, 0, line));
            zones.put(id, new ZoneConfig(id, List.of(CentralSettings.SITES_GROUP), List.of(online), Double.NaN,
                    ZoneConfig.Psychrometer.ASPIRATED, maxAge, "nrc-1971", line));
            sites.put(id, new CentralSettings.Site(id, siteZones, groups, maxAge, line));
        }
        return new CentralSettings(sites);
    }
}
