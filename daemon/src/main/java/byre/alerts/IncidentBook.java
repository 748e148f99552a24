package byre.alerts;

import byre.json.Json;
import byre.json.JsonWriter;
import java.time.Duration;
import java.time.Instant;
import java.util.ArrayList;
import java.util.Collection;
import java.util.LinkedHashMap;
import java.util.LinkedHashSet;
import java.util.List;
import java.util.Map;

/**
 * The open incidents and what each must still send. Pure: no I/O, the time comes in with every call, and
 * every call returns the events to put in the outbox, each naming its channels.
 *
 * <ul>
 *   <li>RAISED opens an incident and tells the watch's channels ({@code raised}); a RAISED for an incident
 *       already open (a restart, a repeated transition) sends nothing.</li>
 *   <li>{@link #tick} sends a {@code reminder} every {@code remind every} and {@code escalated} after
 *       {@code escalate after}, both only while unacknowledged. After a long pause one reminder goes out,
 *       never the ones missed.</li>
 *   <li>{@link #acknowledge} tells everyone told so far and stops reminders and escalation.</li>
 *   <li>CLEARED tells everyone told and closes the incident.</li>
 * </ul>
 * {@link #snapshot()} / {@link #restore} keep it across restarts. Thread-safe.
 */
public final class IncidentBook {
    /** Watch name of the alert raised when a channel keeps failing. */
    public static final String CHANNEL_FAILING = "channel-failing";
    /** Zone of self-watch alerts: byre itself. */
    public static final String SELF_ZONE = "byre";

    private final String site;
    private final IdSource ids;
    private final Map<String, Incident> open = new LinkedHashMap<>();
    private List<String> selfAlertChannels = List.of();
    private EventText text;

    /** Texts in metric units without acknowledgement links. */
    public IncidentBook(String site, IdSource ids) {
        this(site, ids, EventText.metric(site));
    }

    public IncidentBook(String site, IdSource ids, EventText text) {
        this.site = site;
        this.ids = ids;
        this.text = text;
    }

    /** How events are worded from now on (e.g. with acknowledgement links); events already made keep their text. */
    public synchronized void setText(EventText text) {
        this.text = text;
    }

    public synchronized EventText text() {
        return text;
    }

    /** Channels told about byre's own trouble (self-alerts); a failing channel is left out of its own alert. */
    public synchronized void setSelfAlertChannels(List<String> channels) {
        selfAlertChannels = List.copyOf(channels);
    }

    /** Applies one transition from the rule engine. */
    public synchronized List<AlertEvent> accept(WatchOutcome o) {
        if (o == null || o.kind() == null || o.watch() == null || o.at() == null) return List.of();
        String key = key(o.watch(), o.zone());
        Incident inc = open.get(key);
        if (o.kind() == WatchOutcome.Kind.RAISED) {
            if (inc != null) {
                // already open (restart or repeated transition): keep it current, send nothing twice
                inc.value = o.value();
                inc.message = o.message();
                return List.of();
            }
            AlertPolicy policy = o.policy() == null ? AlertPolicy.notifyOnly(List.of()) : o.policy();
            inc = new Incident(key, ids.incidentId(o.at()), o.watch(), o.zone(), o.level(), o.quantity(), o.value(), o.unit(),
                    o.since() == null ? o.at() : o.since(), o.at(), o.message(), policy);
            open.put(key, inc);
            return List.of(tell(inc, EventKind.RAISED, o.at(), text.raised(inc), null, policy.channels()));
        }
        if (inc == null) return List.of();
        inc.value = o.value();
        open.remove(key);
        String msg = text.cleared(inc, o.value(), o.message(), Duration.between(inc.since, o.at()));
        return List.of(event(inc, EventKind.CLEARED, o.at(), msg, null, new ArrayList<>(inc.told)));
    }

    /** Reminders and escalations due at {@code now}; call it every few seconds (or on every rule tick). */
    public synchronized List<AlertEvent> tick(Instant now) {
        List<AlertEvent> out = new ArrayList<>();
        for (Incident inc : open.values()) {
            if (inc.acknowledged()) continue;
            AlertPolicy p = inc.policy;
            // Events carry their due time, not the time of the tick that noticed them, so that a
            // replay (ticking every second) and the live daemon (every few seconds) agree exactly.
            if (p.escalateAfter() != null && !inc.escalated && !p.escalateTo().isEmpty()
                    && !now.isBefore(inc.raisedAt.plus(p.escalateAfter()))) {
                inc.escalated = true;
                Instant due = inc.raisedAt.plus(p.escalateAfter());
                String msg = text.escalated(inc, Duration.between(inc.since, due));
                out.add(tell(inc, EventKind.ESCALATED, due, msg, null, p.escalateTo()));
            }
            if (p.remindEvery() != null && !now.isBefore(inc.lastReminderAt.plus(p.remindEvery()))) {
                Instant due = inc.lastReminderAt.plus(p.remindEvery());
                // After a long outage of byre itself, one reminder now rather than a pile of them.
                inc.lastReminderAt = now.isAfter(due.plus(p.remindEvery())) ? now : due;
                Instant at = inc.lastReminderAt;
                List<String> to = new ArrayList<>(p.channels());
                if (inc.escalated) for (String c : p.escalateTo()) if (!to.contains(c)) to.add(c);
                String msg = text.reminder(inc, Duration.between(inc.since, at));
                out.add(tell(inc, EventKind.REMINDER, at, msg, null, to));
            }
        }
        return out;
    }

    /** Acknowledges an open incident by id: tells everyone told, stops reminders and escalation. */
    public synchronized AckResult acknowledge(String incidentId, String by, Instant now) {
        // Both texts come from outside (MQTT, HTTP, the command line): cleaned here, where every path meets.
        String id = AckBy.incident(incidentId);
        if (id.isEmpty()) {
            return new AckResult(AckResult.Status.INVALID, id, "no incident id given", List.of());
        }
        String who = AckBy.clean(by, "someone");
        for (Incident inc : open.values()) {
            if (!inc.id.equals(id)) continue;
            Duration open = Duration.between(inc.since, now);
            if (inc.acknowledged()) {
                return new AckResult(AckResult.Status.ALREADY, id, "already " + EventText.ackSentence(inc, open) + " (by " + inc.ackBy + ", "
                        + EventText.duration(Duration.between(inc.ackAt, now)) + " ago)", List.of());
            }
            inc.ackBy = who;
            inc.ackAt = now;
            AlertEvent e = event(inc, EventKind.ACKNOWLEDGED, now, text.acknowledged(inc, who, open), who, new ArrayList<>(inc.told));
            return new AckResult(AckResult.Status.ACKNOWLEDGED, id, EventText.ackSentence(inc, open), List.of(e));
        }
        return new AckResult(AckResult.Status.UNKNOWN, id, "no open incident '" + id + "'"
                + (open.isEmpty() ? " (none is open)" : "; open: " + String.join(", ", open.values().stream().map(i -> i.id).toList())),
                List.of());
    }

    /**
     * Raises ({@code active}) or clears a self-watch alert (history disk unhealthy, ...): watch {@code key},
     * zone {@code byre}, level critical, through the self-alert channels. Repeating the same state sends nothing.
     */
    public List<AlertEvent> selfAlert(String key, boolean active, String message, Instant now) {
        return selfAlert(key, "", active, message, now, List.of());
    }

    /**
     * As {@link #selfAlert(String, boolean, String, Instant)}, one incident per {@code subject} (e.g. a channel
     * name), leaving out the channels in {@code exclude} (a failing channel is not told about itself).
     */
    public synchronized List<AlertEvent> selfAlert(String watch, String subject, boolean active, String message, Instant now,
                                                   Collection<String> exclude) {
        String key = "self/" + watch + "/" + subject;
        Incident inc = open.get(key);
        if (active) {
            if (inc != null) return List.of();
            List<String> to = new ArrayList<>(selfAlertChannels);
            to.removeAll(exclude);
            AlertPolicy policy = AlertPolicy.notifyOnly(to);
            inc = new Incident(key, ids.incidentId(now), watch, SELF_ZONE, "critical", null, Double.NaN, null, now, now,
                    message, policy);
            open.put(key, inc);
            return List.of(tell(inc, EventKind.RAISED, now, text.raised(inc), null, to));
        }
        if (inc == null) return List.of();
        open.remove(key);
        String msg = text.cleared(inc, Double.NaN, message, Duration.between(inc.since, now));
        return List.of(event(inc, EventKind.CLEARED, now, msg, null, new ArrayList<>(inc.told)));
    }

    /** The open incidents, oldest first. */
    public synchronized List<OpenIncident> openIncidents() {
        return open.values().stream().map(Incident::view).toList();
    }

    /** Whether the (watch, zone) has an open incident. */
    public synchronized boolean isOpen(String watch, String zone) {
        return open.containsKey(key(watch, zone));
    }

    // ---- persistence ----

    /** All open incidents as one JSON text; {@link #restore} reads it back. */
    public synchronized String snapshot() {
        JsonWriter w = JsonWriter.array();
        for (Incident i : open.values()) {
            w.beginObject().field("key", i.key).field("id", i.id).field("watch", i.watch).field("zone", i.zone)
                    .field("level", i.level).field("quantity", i.quantity).field("value", i.value).field("unit", i.unit)
                    .field("since", i.since.toString()).field("raisedAt", i.raisedAt.toString()).field("message", i.message)
                    .field("notify", i.policy.channels())
                    .field("remindEverySec", i.policy.remindEvery() == null ? -1 : i.policy.remindEvery().getSeconds())
                    .field("escalateAfterSec", i.policy.escalateAfter() == null ? -1 : i.policy.escalateAfter().getSeconds())
                    .field("escalateTo", i.policy.escalateTo())
                    .field("told", i.told)
                    .field("lastReminderAt", i.lastReminderAt.toString())
                    .field("escalated", i.escalated)
                    .field("ackBy", i.ackBy)
                    .field("ackAt", i.ackAt == null ? null : i.ackAt.toString())
                    .end();
        }
        return w.toString();
    }

    /**
     * Replaces the open incidents by those in a {@link #snapshot()}. Returns null on success, else a message
     * saying why the text was not used (the book is then left empty rather than half-filled).
     */
    public synchronized String restore(String snapshot) {
        open.clear();
        if (snapshot == null || snapshot.isBlank()) return null;
        try {
            Map<String, Incident> read = new LinkedHashMap<>();
            if (!(Json.parse(snapshot) instanceof List<?> items)) return "incident snapshot is not a JSON array";
            for (Object o : items) {
                Map<?, ?> m = (Map<?, ?>) o;
                AlertPolicy policy = new AlertPolicy(strings(m.get("notify")), seconds(m.get("remindEverySec")),
                        seconds(m.get("escalateAfterSec")), strings(m.get("escalateTo")));
                Incident i = new Incident(s(m, "key"), s(m, "id"), s(m, "watch"), s(m, "zone"), s(m, "level"), s(m, "quantity"),
                        m.get("value") instanceof Double d ? d : Double.NaN, s(m, "unit"), Instant.parse(s(m, "since")),
                        Instant.parse(s(m, "raisedAt")), s(m, "message"), policy);
                i.told.addAll(strings(m.get("told")));
                i.lastReminderAt = Instant.parse(s(m, "lastReminderAt"));
                i.escalated = Boolean.TRUE.equals(m.get("escalated"));
                i.ackBy = s(m, "ackBy");
                i.ackAt = s(m, "ackAt") == null ? null : Instant.parse(s(m, "ackAt"));
                read.put(i.key, i);
            }
            open.putAll(read);
            return null;
        } catch (RuntimeException e) {
            return "incident snapshot could not be read (" + e.getClass().getSimpleName() + ": " + e.getMessage()
                    + "); starting with no open incidents";
        }
    }

    // ---- helpers ----

    private AlertEvent tell(Incident inc, EventKind kind, Instant at, String message, String by, List<String> to) {
        inc.told.addAll(to);
        return event(inc, kind, at, message, by, to);
    }

    private AlertEvent event(Incident inc, EventKind kind, Instant at, String message, String by, List<String> to) {
        return new AlertEvent(ids.eventId(at), inc.id, kind, site, inc.watch, inc.zone, inc.level, inc.quantity, inc.value,
                inc.unit, inc.since, at, message, by, List.of(), new ArrayList<>(new LinkedHashSet<>(to)));
    }

    private static String key(String watch, String zone) {
        return watch + "/" + (zone == null ? "" : zone);
    }

    /** "45 s", "42 min", "2 h 5 min": how long, for people (see {@link EventText#duration}). */
    public static String human(Duration d) {
        return EventText.duration(d);
    }

    private static List<String> strings(Object o) {
        List<String> out = new ArrayList<>();
        if (o instanceof List<?> l) for (Object x : l) out.add(String.valueOf(x));
        return out;
    }

    private static Duration seconds(Object o) {
        return o instanceof Double d && d >= 0 ? Duration.ofSeconds(d.longValue()) : null;
    }

    private static String s(Map<?, ?> m, String key) {
        Object o = m.get(key);
        return o == null ? null : o.toString();
    }
}
