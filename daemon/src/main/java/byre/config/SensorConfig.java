package byre.config;

import byre.units.Quantity;
import byre.units.Unit;

/**
 * One sensor entry. A topic may hold MQTT wildcards; then {@code idLevel} (1-based) names the
 * topic level whose text completes the sensor id: entry {@code pens-dry} with topic
 * {@code barn/+/dry} and id-level 2 makes {@code pens-dry/pen3} from {@code barn/pen3/dry}.
 * {@code timePath} is the JSON field holding the reading's own time, if any. {@code maxIds} caps how many
 * distinct ids a family takes in (each costs memory for its counters, flood bucket and history stream):
 * a device inventing topics cannot run byre out of memory.
 */
public record SensorConfig(String id, String topic, Quantity quantity, Unit unit, PayloadFormat payload,
                           String timePath, int idLevel, int line, int maxIds) {
    /** Distinct ids a wildcard family takes in unless its {@code max-ids} says otherwise. */
    public static final int DEFAULT_MAX_IDS = 300;
    /** The largest {@code max-ids} accepted. */
    public static final int MAX_IDS_LIMIT = 10_000;

    public SensorConfig(String id, String topic, Quantity quantity, Unit unit, PayloadFormat payload, String timePath,
                        int idLevel, int line) {
        this(id, topic, quantity, unit, payload, timePath, idLevel, line, DEFAULT_MAX_IDS);
    }

    public boolean isFamily() {
        return topic.contains("+") || topic.contains("#");
    }
}
