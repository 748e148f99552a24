package byre.config;

import byre.units.Dimension;
import byre.units.Quantity;
import byre.units.Suggest;
import byre.units.Unit;
import java.util.HashMap;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.Optional;
import java.util.Set;
import org.snakeyaml.engine.v2.nodes.Node;

/** Reads and checks {@code sensors:}: each sensor's topic (or family of topics), quantity, unit and payload. */
final class SensorSection {
    static final Set<String> KEYS = NodeReader.ordered("topic", "quantity", "unit", "payload", "time", "id-level", "max-ids");

    private SensorSection() {}

    /** The sensors by id, in the file's order; a sensor without a usable topic, quantity or unit is left out. */
    static Map<String, SensorConfig> read(NodeReader r, Node node) {
        Map<String, SensorConfig> out = new LinkedHashMap<>();
        if (node == null) return out;
        Map<String, Node> entries = r.mapping(node, null, "sensors");
        Map<String, String> topicOwner = new HashMap<>();
        for (Map.Entry<String, Node> e : entries.entrySet()) {
            String id = e.getKey();
            Node n = e.getValue();
            if (!id.matches("[A-Za-z0-9][A-Za-z0-9_.-]*")) {
                r.problem(r.keyOf(n), "sensor id '" + id + "' must be letters, digits, '-', '_' or '.'");
            }
            Map<String, Node> f = r.mapping(n, KEYS, "sensor " + id);
            String topic = r.string(f.get("topic"), "topic", null);
            if (topic == null) {
                r.problem(n, "sensor " + id + " has no topic");
                continue;
            }
            String clash = topicOwner.putIfAbsent(topic, id);
            if (clash != null) r.problem(f.get("topic"), "duplicate topic '" + topic + "': already used by sensor " + clash);
            String qText = r.string(f.get("quantity"), "quantity", null);
            Quantity q = null;
            if (qText == null) {
                r.problem(n, "sensor " + id + " has no quantity (one of " + String.join(", ", measurableIds()) + ")");
            } else {
                q = Quantity.byId(qText).filter(Quantity::measurable).orElse(null);
                if (q == null) {
                    r.problem(f.get("quantity"), "unknown quantity '" + qText + "'" + Suggest.hint(qText, measurableIds())
                            + "; a sensor measures one of " + String.join(", ", measurableIds()));
                }
            }
            Unit unit = q == null ? null : q.canonicalUnit();
            String uText = r.string(f.get("unit"), "unit", null);
            if (uText != null) {
                Optional<Unit> parsed = Unit.bySymbol(uText);
                if (parsed.isEmpty()) {
                    r.problem(f.get("unit"), "unknown unit '" + uText + "'" + Suggest.hint(uText, Unit.symbols())
                            + "; known units: " + String.join(" ", Unit.symbols()));
                } else if (q != null && parsed.get().dimension() != q.dimension()) {
                    r.problem(f.get("unit"), "unit '" + uText + "' does not measure " + q.id() + " (use one of "
                            + String.join(" ", unitsOf(q.dimension())) + ")");
                } else {
                    unit = parsed.get();
                }
            }
            PayloadFormat payload = payload(r, f.get("payload"));
            String time = r.string(f.get("time"), "time", null);
            String timePath = null;
            if (time != null) {
                if (time.startsWith("json:") && time.length() > 5 && payload.kind() == PayloadFormat.Kind.JSON) {
                    timePath = time.substring(5);
                } else {
                    r.problem(f.get("time"), "time must be json:<path> and needs a json: payload (SenML carries its own time)");
                }
            }
            int idLevel = r.integer(f.get("id-level"), "id-level", 0);
            boolean family = topic.contains("+") || topic.contains("#");
            if (!validTopicFilter(topic)) {
                r.problem(f.get("topic"), "topic '" + topic + "' is not a valid MQTT topic filter ('+' and '#' must fill a whole level, '#' only last)");
            } else if (family && idLevel <= 0) {
                r.problem(f.get("topic"), "topic '" + topic + "' has wildcards: add id-level: N (the topic level, from 1, that names each sensor)");
            } else if (idLevel > 0 && idLevel > topic.split("/", -1).length && !topic.endsWith("#")) {
                r.problem(f.get("id-level"), "id-level " + idLevel + " is beyond the " + topic.split("/", -1).length + " levels of '" + topic + "'");
            }
            int maxIds = r.integer(f.get("max-ids"), "max-ids", SensorConfig.DEFAULT_MAX_IDS);
            if (f.get("max-ids") != null && !family) {
                r.problem(f.get("max-ids"), "max-ids applies only to a topic with wildcards (a family of sensors)");
            } else if (maxIds < 1 || maxIds > SensorConfig.MAX_IDS_LIMIT) {
                r.problem(f.get("max-ids"), "max-ids must be 1.." + SensorConfig.MAX_IDS_LIMIT + ", not " + maxIds);
            }
            if (q != null && unit != null) {
                out.put(id, new SensorConfig(id, topic, q, unit, payload, timePath, idLevel, NodeReader.line(n), maxIds));
            }
        }
        return out;
    }

    private static PayloadFormat payload(NodeReader r, Node node) {
        String text = r.string(node, "payload", "number");
        if (text.equals("number")) return PayloadFormat.NUMBER;
        if (text.startsWith("json:") && text.length() > 5) return new PayloadFormat(PayloadFormat.Kind.JSON, text.substring(5));
        if (text.startsWith("senml:") && text.length() > 6) return new PayloadFormat(PayloadFormat.Kind.SENML, text.substring(6));
        r.problem(node, "payload must be number, json:<dotted.path> or senml:<name>, not '" + text + "'");
        return PayloadFormat.NUMBER;
    }

    private static boolean validTopicFilter(String topic) {
        if (topic.isEmpty()) return false;
        String[] levels = topic.split("/", -1);
        for (int i = 0; i < levels.length; i++) {
            String l = levels[i];
            if (l.contains("#") && (!l.equals("#") || i != levels.length - 1)) return false;
            if (l.contains("+") && !l.equals("+")) return false;
        }
        return true;
    }

    private static List<String> measurableIds() {
        return java.util.Arrays.stream(Quantity.values()).filter(Quantity::measurable).map(Quantity::id).toList();
    }

    private static List<String> unitsOf(Dimension d) {
        return java.util.Arrays.stream(Unit.values()).filter(u -> u.dimension() == d).map(Unit::symbol).toList();
    }
}
