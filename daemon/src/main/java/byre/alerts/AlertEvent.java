package byre.alerts;

import byre.json.Json;
import byre.json.JsonWriter;
import java.time.Instant;
import java.time.format.DateTimeParseException;
import java.util.ArrayList;
import java.util.List;
import java.util.Map;

/**
 * One event of an incident, in the documented event shape. {@code channels} names where it must go
 * (not part of the JSON); {@code by} is set only on {@code acknowledged}; {@code folded} lists the ids of
 * events a {@code summary} stands for. {@code value} is NaN when there is none (JSON null).
 */
public record AlertEvent(String id, String incident, EventKind kind, String site, String watch, String zone,
                         String level, String quantity, double value, String unit, Instant since, Instant at,
                         String message, String by, List<String> folded, List<String> channels) {
    public AlertEvent {
        folded = folded == null ? List.of() : List.copyOf(folded);
        channels = channels == null ? List.of() : List.copyOf(channels);
    }

    /** The same event addressed to other channels. */
    public AlertEvent to(List<String> targets) {
        return new AlertEvent(id, incident, kind, site, watch, zone, level, quantity, value, unit, since, at, message, by,
                folded, targets);
    }

    /**
     * The event JSON (field order as documented); {@code by} and {@code folded} only when set. {@code value} is
     * rounded to the decimals that carry meaning for its quantity ({@link EventText#decimals}), so a receiver sees
     * {@code 83.7}, not {@code 83.70250000000001}.
     */
    public String toJson() {
        JsonWriter w = new JsonWriter()
                .field("id", id).field("incident", incident).field("event", kind.id()).field("site", site)
                .field("watch", watch).field("zone", zone).field("level", level).field("quantity", quantity)
                .field("value", EventText.rounded(quantity, value)).field("unit", unit)
                .field("since", since == null ? null : since.toString())
                .field("at", at == null ? null : at.toString())
                .field("message", message);
        if (by != null) w.field("by", by);
        if (!folded.isEmpty()) w.field("folded", folded);
        return w.toString();
    }

    /** Reads event JSON back (outbox rows, MQTT); channels are not part of it and come back empty. */
    public static AlertEvent fromJson(String json) {
        Object root = Json.parse(json);
        if (!(root instanceof Map<?, ?> m)) throw new IllegalArgumentException("an alert event must be a JSON object");
        EventKind kind = EventKind.of(str(m, "event"));
        if (kind == null) throw new IllegalArgumentException("unknown event kind '" + str(m, "event") + "'");
        Object v = m.get("value");
        List<String> folded = new ArrayList<>();
        if (m.get("folded") instanceof List<?> l) for (Object o : l) folded.add(String.valueOf(o));
        return new AlertEvent(str(m, "id"), str(m, "incident"), kind, str(m, "site"), str(m, "watch"), str(m, "zone"),
                str(m, "level"), str(m, "quantity"), v instanceof Double d ? d : Double.NaN, str(m, "unit"),
                instant(str(m, "since")), instant(str(m, "at")), str(m, "message"), str(m, "by"), folded, List.of());
    }

    private static String str(Map<?, ?> m, String key) {
        Object o = m.get(key);
        return o == null ? null : o.toString();
    }

    private static Instant instant(String s) {
        if (s == null) return null;
        try {
            return Instant.parse(s);
        } catch (DateTimeParseException e) {
            throw new IllegalArgumentException("'" + s + "' is not an ISO 8601 instant");
        }
    }

    /** A few words for mail subjects and summaries: "ALERT: heat-stress cows (warning)". */
    public String headline() {
        String what = switch (kind) {
            case RAISED -> "ALERT";
            case REMINDER -> "Reminder";
            case ESCALATED -> "ESCALATED";
            case CLEARED -> "All clear";
            case ACKNOWLEDGED -> "Acknowledged";
            case TEST -> "Test";
            case SUMMARY -> "Held back";
            case DIGEST -> "Night digest";
        };
        StringBuilder sb = new StringBuilder(what);
        if (watch != null) sb.append(": ").append(watch);
        if (zone != null) sb.append(' ').append(zone);
        if (level != null && (kind == EventKind.RAISED || kind == EventKind.ESCALATED || kind == EventKind.REMINDER)) {
            sb.append(" (").append(level).append(')');
        }
        return sb.toString();
    }
}
