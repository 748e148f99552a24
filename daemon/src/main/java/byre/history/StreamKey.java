package byre.history;

import byre.units.Quantity;
import java.util.Objects;
import java.util.Optional;

/**
 * Names one stored stream: a raw sensor ({@code pen1-dry}) or a zone-level quantity ({@code calf-pen-1.thi}).
 * The zone form uses the same {@code zone.quantity} spelling as the rule files.
 */
public record StreamKey(Kind kind, String name) {

    public enum Kind {
        SENSOR("sensor"), ZONE("zone");

        private final String dbName;

        Kind(String dbName) { this.dbName = dbName; }

        /** The spelling stored in the {@code stream.kind} column. */
        public String dbName() { return dbName; }

        static Optional<Kind> fromDb(String s) {
            for (Kind k : values()) if (k.dbName.equals(s)) return Optional.of(k);
            return Optional.empty();
        }
    }

    public StreamKey {
        Objects.requireNonNull(kind, "stream kind");
        if (name == null || name.isBlank()) throw new IllegalArgumentException("stream name must not be empty");
    }

    public static StreamKey sensor(String sensorId) { return new StreamKey(Kind.SENSOR, sensorId); }

    public static StreamKey zone(String zone, Quantity quantity) { return new StreamKey(Kind.ZONE, zone + "." + quantity.id()); }

    /** The zone part of a zone key, or empty for a sensor key. */
    public Optional<String> zone() {
        if (kind != Kind.ZONE) return Optional.empty();
        int dot = name.lastIndexOf('.');
        return Optional.of(dot < 0 ? name : name.substring(0, dot));
    }

    /** The quantity part of a zone key, or empty for a sensor key or an unknown quantity name. */
    public Optional<Quantity> quantity() {
        if (kind != Kind.ZONE) return Optional.empty();
        int dot = name.lastIndexOf('.');
        return dot < 0 ? Optional.empty() : Quantity.byId(name.substring(dot + 1));
    }

    @Override
    public String toString() { return kind.dbName + ":" + name; }
}
