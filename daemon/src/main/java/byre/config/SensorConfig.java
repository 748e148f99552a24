package byre.config;

import byre.units.Quantity;
import byre.units.Unit;

/**
 * One sensor entry. A topic may hold MQTT wildcards; then {@code idLevel} (1-based) names the
 * topic level whose text completes the sensor id: entry {@code pens-dry} with topic
 * {@code barn/+/dry} and id-level 2 makes {@code pens-dry/pen3} from {@code barn/pen3/dry}.
 * {@code timePath} is the JSON field holding the reading's own time, if any.
 */
public record SensorConfig(String id, String topic, Quantity quantity, Unit unit, PayloadFormat payload,
                           String timePath, int idLevel, int line) {
    public boolean isFamily() {
        return topic.contains("+") || topic.contains("#");
    }
}
