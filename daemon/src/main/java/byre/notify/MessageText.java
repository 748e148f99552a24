package byre.notify;

import byre.alerts.AlertEvent;
import java.time.Instant;
import java.time.ZoneId;
import java.time.format.DateTimeFormatter;
import java.util.Locale;

/** Mail text for an event: a subject line and the event's message as the body. */
public final class MessageText {
    private static final DateTimeFormatter CLOCK = DateTimeFormatter.ofPattern("EEE d MMM HH:mm z", Locale.ROOT);

    private final ZoneId zone;

    public MessageText(ZoneId zone) {
        this.zone = zone == null ? ZoneId.of("UTC") : zone;
    }

    public String subject(AlertEvent e) {
        return "[byre " + e.site() + "] " + e.headline();
    }

    /**
     * The event's message, the same text every other channel carries (made by {@link byre.alerts.EventText}),
     * then the event's time on the farm's clock.
     */
    public String body(AlertEvent e) {
        StringBuilder sb = new StringBuilder();
        if (e.message() != null && !e.message().isBlank()) sb.append(e.message().strip()).append('\n');
        if (e.at() != null) sb.append('\n').append("Farm time: ").append(time(e.at())).append('\n');
        return sb.toString();
    }

    private String time(Instant t) {
        return CLOCK.format(t.atZone(zone));
    }
}
