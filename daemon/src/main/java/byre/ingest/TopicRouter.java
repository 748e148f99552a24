package byre.ingest;

import byre.config.SensorConfig;
import byre.mqtt.TopicFilter;
import java.util.ArrayList;
import java.util.Collection;
import java.util.HashMap;
import java.util.HashSet;
import java.util.List;
import java.util.Map;
import java.util.Set;

/**
 * Finds the sensor a topic belongs to: exact topics by hash, wildcard families by matching. A family
 * takes in at most its {@code max-ids} distinct ids; a route to a further id is marked {@code overCap},
 * and the ids are not remembered beyond the cap, so any number of invented topics costs no memory.
 */
public final class TopicRouter {
    /** A sensor resolved from a topic: its configuration, its concrete id, and whether its family is full. */
    public record Route(SensorConfig sensor, String sensorId, boolean overCap) {
        public Route(SensorConfig sensor, String sensorId) {
            this(sensor, sensorId, false);
        }
    }

    // Replaced, never changed, when a central byre adds the sensors of a site it found: routing every message reads
    // a plain map (one volatile read), and adding is rare.
    private volatile Map<String, Route> exact = Map.of();
    private volatile List<Family> families = List.of();

    /** A wildcard entry, its split filter and the ids it has taken in. */
    private static final class Family {
        final SensorConfig sensor;
        final String[] filter;
        final Set<String> ids = new HashSet<>();

        Family(SensorConfig sensor) {
            this.sensor = sensor;
            this.filter = TopicFilter.levels(sensor.topic());
        }

        /** True when the id is known or there is room for it. */
        synchronized boolean admit(String id) {
            if (ids.contains(id)) return true;
            if (ids.size() >= sensor.maxIds()) return false;
            ids.add(id);
            return true;
        }

        synchronized int size() {
            return ids.size();
        }
    }

    public TopicRouter(Collection<SensorConfig> sensors) {
        add(sensors);
    }

    /** Routes these sensors' topics too (a site a central byre found after the start); known topics stay as they are. */
    public synchronized void add(Collection<SensorConfig> sensors) {
        Map<String, Route> e = new HashMap<>(exact);
        List<Family> f = new ArrayList<>(families);
        for (SensorConfig s : sensors) {
            if (s.isFamily()) {
                if (f.stream().noneMatch(x -> x.sensor.id().equals(s.id()))) f.add(new Family(s));
            } else {
                e.putIfAbsent(s.topic(), new Route(s, s.id()));
            }
        }
        exact = e;
        families = f;
    }

    /** The route for a topic, or null when no sensor is configured for it. */
    public Route route(String topic) {
        Route r = exact.get(topic);
        if (r != null) return r;
        if (families.isEmpty()) return null;
        String[] levels = TopicFilter.levels(topic);
        for (Family f : families) {
            if (TopicFilter.matches(f.filter, levels)) {
                int i = f.sensor.idLevel() - 1;
                if (i >= 0 && i < levels.length && !levels[i].isEmpty()) {
                    String id = f.sensor.id() + "/" + levels[i];
                    return new Route(f.sensor, id, !f.admit(id));
                }
            }
        }
        return null;
    }

    /** Distinct ids the family has taken in (0 for an unknown or exact sensor). */
    public int familySize(String familyId) {
        for (Family f : families) if (f.sensor.id().equals(familyId)) return f.size();
        return 0;
    }
}
