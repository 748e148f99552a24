package byre.ingest;

import byre.units.Quantity;
import java.time.Instant;

/**
 * One accepted sensor reading, converted to the canonical unit of its quantity. {@code ack}, when not
 * null, acknowledges the MQTT message to the broker and is run once the reading is stored.
 */
public record Reading(String sensorId, Quantity quantity, double value, Instant at, Runnable ack) {
    public Reading(String sensorId, Quantity quantity, double value, Instant at) {
        this(sensorId, quantity, value, at, null);
    }
}
