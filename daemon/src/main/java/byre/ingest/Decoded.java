package byre.ingest;

import java.time.Instant;

/**
 * What the payload decoder made of one message: a value in the sensor's unit (and the unit, which a
 * SenML record may override) with the payload's own time if it had one, or a rejection with detail.
 */
public record Decoded(double value, byre.units.Unit unit, Instant payloadTime, RejectReason reject, String detail) {
    public static Decoded value(double value, byre.units.Unit unit, Instant payloadTime) {
        return new Decoded(value, unit, payloadTime, null, null);
    }

    public static Decoded rejected(RejectReason reason, String detail) {
        return new Decoded(Double.NaN, null, null, reason, detail);
    }

    public boolean ok() {
        return reject == null;
    }
}
