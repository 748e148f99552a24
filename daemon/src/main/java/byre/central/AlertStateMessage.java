package byre.central;

import byre.alerts.AlertEvent;
import byre.alerts.EventKind;
import java.nio.charset.StandardCharsets;
import java.util.Objects;

/**
 * One message on a site's alert state topic, {@code <prefix>/<site>/alerts/<watch>/<zone>}: the site's byre keeps there,
 * retained, the last event of that watch in that zone ({@code raised} while open, {@code cleared} once it ended), so a
 * centre that subscribes late still learns what is open. Pure: reads the topic and payload, no I/O.
 *
 * @param event the state as event JSON, null when the slot was emptied (an empty retained message)
 */
public record AlertStateMessage(String site, String watch, String zone, AlertEvent event) {
    public AlertStateMessage {
        Objects.requireNonNull(site);
        Objects.requireNonNull(watch);
        Objects.requireNonNull(zone);
    }

    /** Far above any event the site's byre writes; what is longer is not read. */
    static final int MAX_BYTES = 16 * 1024;

    /** Whether the state says the alert is open (raised, and not cleared since). */
    public boolean open() {
        return event != null && event.kind() != EventKind.CLEARED;
    }

    /**
     * Reads one message; {@code under} is {@code <prefix>/}.
     *
     * @throws IllegalArgumentException saying what is wrong with it, for the log
     */
    public static AlertStateMessage read(String under, String topic, byte[] payload) {
        String[] levels = topic.startsWith(under) ? topic.substring(under.length()).split("/", -1) : new String[0];
        if (levels.length != 4 || !levels[1].equals("alerts") || levels[0].isEmpty() || levels[2].isEmpty() || levels[3].isEmpty()) {
            throw new IllegalArgumentException("the topic is not " + under + "<site>/alerts/<watch>/<zone>");
        }
        String site = levels[0];
        String watch = levels[2];
        String zone = levels[3];
        if (payload.length == 0) return new AlertStateMessage(site, watch, zone, null);
        if (payload.length > MAX_BYTES) {
            throw new IllegalArgumentException("it is " + payload.length + " bytes, more than the " + MAX_BYTES + " an alert state may have");
        }
        AlertEvent e;
        try {
            e = AlertEvent.fromJson(new String(payload, StandardCharsets.UTF_8));
        } catch (byre.json.Json.JsonException ex) {
            throw new IllegalArgumentException("it is not event JSON (" + ex.getMessage() + ")");
        }
        switch (e.kind()) {
            case RAISED, REMINDER, ESCALATED, ACKNOWLEDGED, CLEARED -> { }
            default -> throw new IllegalArgumentException("a '" + e.kind().id() + "' event is not the state of an alert");
        }
        if (e.incident() == null || e.incident().isBlank()) throw new IllegalArgumentException("it names no incident");
        if (!watch.equals(e.watch()) || !zone.equals(e.zone())) {
            throw new IllegalArgumentException("it is the state of watch '" + clip(e.watch()) + "' in zone '" + clip(e.zone())
                    + "', not of the topic's '" + clip(watch) + "' in '" + clip(zone) + "'");
        }
        if (e.site() != null && !e.site().equals(site)) {
            throw new IllegalArgumentException("it says site '" + clip(e.site()) + "', not the topic's '" + clip(site) + "'");
        }
        if (e.kind() != EventKind.CLEARED && e.at() == null && e.since() == null) {
            throw new IllegalArgumentException("it says neither since when nor at what time the alert was open");
        }
        return new AlertStateMessage(site, watch, zone, e);
    }

    /** A text from the payload or topic as a log line may show it: no control characters, at most 40 characters. */
    static String clip(String s) {
        if (s == null) return "null";
        String one = s.replaceAll("\\p{Cntrl}", "?");
        return one.length() > 40 ? one.substring(0, 40) + "…" : one;
    }

    /** The incident the state is of, null for an emptied slot. */
    public String incident() {
        return event == null ? null : event.incident();
    }

}
