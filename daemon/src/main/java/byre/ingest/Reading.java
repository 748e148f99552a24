package byre.ingest;

import byre.units.Quantity;
import java.time.Instant;

/** One accepted sensor reading, converted to the canonical unit of its quantity. */
public record Reading(String sensorId, Quantity quantity, double value, Instant at) {
}
