package byre.config;

import byre.units.Suggest;
import java.time.Duration;
import java.util.ArrayList;
import java.util.HashMap;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.Set;
import org.snakeyaml.engine.v2.nodes.Node;

/** Reads and checks {@code zones:}: each zone's sensors (each in one zone only), groups, elevation, psychrometer, max-age and THI. */
final class ZoneSection {
    static final Set<String> KEYS = NodeReader.ordered("groups", "sensors", "elevation", "psychrometer", "max-age", "thi");
    static final List<String> THI_VARIANTS = java.util.Arrays.stream(byre.climate.ThiVariant.values()).map(byre.climate.ThiVariant::id).toList();

    private ZoneSection() {}

    /** The zones by id, in the file's order; {@code sensors} are those read from {@code sensors:}. */
    static Map<String, ZoneConfig> read(NodeReader r, Node node, Map<String, SensorConfig> sensors) {
        Map<String, ZoneConfig> out = new LinkedHashMap<>();
        if (node == null) return out;
        Map<String, String> sensorOwner = new HashMap<>();
        for (Map.Entry<String, Node> e : r.mapping(node, null, "zones").entrySet()) {
            String id = e.getKey();
            Node n = e.getValue();
            if (!id.matches("[A-Za-z0-9][A-Za-z0-9_.-]*")) r.problem(r.keyOf(n), "zone id '" + id + "' must be letters, digits, '-', '_' or '.'");
            Map<String, Node> f = r.mapping(n, KEYS, "zone " + id);
            List<String> groups = r.stringList(f.get("groups"), "groups");
            List<String> zs = new ArrayList<>();
            for (NodeReader.Item item : r.items(f.get("sensors"), "sensors")) {
                String s = item.value();
                zs.add(s);
                if (!sensors.containsKey(s) && !isFamilyMember(s, sensors)) {
                    r.problem(item.node(), "zone " + id + " names unknown sensor '" + s + "'" + Suggest.hint(s, sensors.keySet()));
                }
                String other = sensorOwner.putIfAbsent(s, id);
                if (other != null) r.problem(item.node(), "sensor " + s + " is already in zone " + other + "; a sensor belongs to one zone");
            }
            if (zs.isEmpty()) r.problem(n, "zone " + id + " lists no sensors");
            double elevationM = Double.NaN;
            Node el = f.get("elevation");
            if (el != null) {
                String t = r.string(el, "elevation", "");
                java.util.regex.Matcher m = java.util.regex.Pattern.compile("\\s*(-?\\d+(?:\\.\\d+)?)\\s*(m|ft)?\\s*").matcher(t);
                if (m.matches()) {
                    elevationM = Double.parseDouble(m.group(1)) * ("ft".equals(m.group(2)) ? 0.3048 : 1.0);
                    if (elevationM < -500 || elevationM > 6000) r.problem(el, "elevation " + t + " is outside -500..6000 m");
                } else {
                    r.problem(el, "elevation must be a height such as '240 m' or '790 ft', not '" + t + "'");
                }
            }
            String ps = r.string(f.get("psychrometer"), "psychrometer", "aspirated");
            ZoneConfig.Psychrometer psychrometer = ZoneConfig.Psychrometer.ASPIRATED;
            if (ps.equals("screen")) {
                psychrometer = ZoneConfig.Psychrometer.SCREEN;
            } else if (!ps.equals("aspirated")) {
                r.problem(f.get("psychrometer"), "psychrometer must be 'aspirated' or 'screen', not '" + ps + "'" + Suggest.hint(ps, List.of("aspirated", "screen")));
            }
            // Without max-age the zone's max-age follows how often its sensors report (byre.daemon.Freshness).
            Duration maxAge = r.duration(f.get("max-age"), "max-age", ZoneConfig.UNLEARNT_MAX_AGE);
            String thi = r.string(f.get("thi"), "thi", "nrc-1971");
            if (!THI_VARIANTS.contains(thi)) {
                r.problem(f.get("thi"), "unknown THI variant '" + thi + "'" + Suggest.hint(thi, THI_VARIANTS) + "; one of " + String.join(", ", THI_VARIANTS));
            }
            out.put(id, new ZoneConfig(id, groups, zs, elevationM, psychrometer, maxAge, thi, NodeReader.line(n), f.get("max-age") == null));
        }
        return out;
    }

    /** {@code family/member}: one sensor of a family (a sensor whose topic has wildcards). */
    private static boolean isFamilyMember(String id, Map<String, SensorConfig> sensors) {
        int slash = id.indexOf('/');
        if (slash <= 0) return false;
        SensorConfig family = sensors.get(id.substring(0, slash));
        return family != null && family.isFamily();
    }
}
