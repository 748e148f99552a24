package byre.notify;

import byre.alerts.AlertEvent;
import byre.alerts.EventKind;
import byre.json.JsonWriter;
import java.time.Instant;
import java.time.ZoneId;
import java.time.format.DateTimeFormatter;
import java.util.Locale;

/** Human text for an event: a subject line and a short plain body that reads well on a phone. */
public final class MessageText {
    private static final DateTimeFormatter CLOCK = DateTimeFormatter.ofPattern("EEE d MMM HH:mm z", Locale.ROOT);

    private final ZoneId zone;

    public MessageText(ZoneId zone) {
        this.zone = zone == null ? ZoneId.of("UTC") : zone;
    }

    public String subject(AlertEvent e) {
        return "[byre " + e.site() + "] " + e.headline();
    }

    public String body(AlertEvent e) {
        StringBuilder sb = new StringBuilder();
        sb.append(e.headline()).append('\n');
        if (e.message() != null && !e.message().isBlank()) sb.append(e.message()).append('\n');
        sb.append('\n');
        if (e.quantity() != null && Double.isFinite(e.value())) {
            sb.append(e.quantity()).append(": ").append(JsonWriter.format(Math.round(e.value() * 10) / 10.0));
            if (e.unit() != null && !e.unit().isEmpty()) sb.append(' ').append(e.unit());
            sb.append('\n');
        }
        if (e.since() != null && e.kind() != EventKind.TEST) sb.append("Since: ").append(time(e.since())).append('\n');
        if (e.at() != null) sb.append("At: ").append(time(e.at())).append('\n');
        if (e.by() != null) sb.append("By: ").append(e.by()).append('\n');
        if (e.incident() != null && (e.kind() == EventKind.RAISED || e.kind() == EventKind.REMINDER || e.kind() == EventKind.ESCALATED)) {
            sb.append("Acknowledge: byre ack ").append(e.incident()).append('\n');
        }
        sb.append("Site: ").append(e.site()).append('\n');
        return sb.toString();
    }

    private String time(Instant t) {
        return CLOCK.format(t.atZone(zone));
    }
}
