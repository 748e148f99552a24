package byre.rules;

import byre.units.Quantity;
import java.time.Instant;

/** One value of one zone-level stream, in the quantity's canonical unit: what watches evaluate. */
public record ZoneReading(Instant at, String zone, Quantity quantity, double value) {
}
