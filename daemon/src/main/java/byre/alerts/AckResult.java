package byre.alerts;

import java.util.List;

/**
 * The answer to an acknowledgement: {@code ACKNOWLEDGED} with the events to send, {@code ALREADY} (someone was
 * first: {@code detail} says who), {@code UNKNOWN} (no open incident has that id) or {@code INVALID} (bad request).
 */
public record AckResult(Status status, String incident, String detail, List<AlertEvent> events) {
    public enum Status { ACKNOWLEDGED, ALREADY, UNKNOWN, INVALID }

    public AckResult {
        events = events == null ? List.of() : List.copyOf(events);
    }

    public boolean ok() {
        return status == Status.ACKNOWLEDGED || status == Status.ALREADY;
    }

    /** HTTP status for the admin API: 200, 200, 404, 400. */
    public int httpStatus() {
        return switch (status) {
            case ACKNOWLEDGED, ALREADY -> 200;
            case UNKNOWN -> 404;
            case INVALID -> 400;
        };
    }

    /** {"status":"acknowledged","incident":"…","detail":"…"} */
    public String toJson() {
        return new byre.json.JsonWriter().field("status", status.name().toLowerCase(java.util.Locale.ROOT))
                .field("incident", incident).field("detail", detail).toString();
    }
}
