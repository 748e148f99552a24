package byre.ingest;

import byre.config.SensorConfig;
import java.util.ArrayList;
import java.util.Collection;
import java.util.HashMap;
import java.util.List;
import java.util.Map;

/** Finds the sensor a topic belongs to: exact topics by hash, wildcard families by matching. */
public final class TopicRouter {
    /** A sensor resolved from a topic: its configuration and its concrete id. */
    public record Route(SensorConfig sensor, String sensorId) {}

    private final Map<String, Route> exact = new HashMap<>();
    private final List<SensorConfig> families = new ArrayList<>();

    public TopicRouter(Collection<SensorConfig> sensors) {
        for (SensorConfig s : sensors) {
            if (s.isFamily()) {
                families.add(s);
            } else {
                exact.put(s.topic(), new Route(s, s.id()));
            }
        }
    }

    /** The route for a topic, or null when no sensor is configured for it. */
    public Route route(String topic) {
        Route r = exact.get(topic);
        if (r != null) return r;
        if (families.isEmpty()) return null;
        String[] levels = topic.split("/", -1);
        for (SensorConfig f : families) {
            if (matches(f.topic().split("/", -1), levels)) {
                int i = f.idLevel() - 1;
                if (i >= 0 && i < levels.length && !levels[i].isEmpty()) return new Route(f, f.id() + "/" + levels[i]);
            }
        }
        return null;
    }

    /** MQTT 3.1.1 section 4.7 topic filter matching. */
    public static boolean matches(String[] filter, String[] topic) {
        for (int i = 0; i < filter.length; i++) {
            if (filter[i].equals("#")) return true;
            if (i >= topic.length) return false;
            if (!filter[i].equals("+") && !filter[i].equals(topic[i])) return false;
        }
        return filter.length == topic.length;
    }
}
