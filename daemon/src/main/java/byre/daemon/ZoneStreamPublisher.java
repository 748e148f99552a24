package byre.daemon;

import byre.json.JsonWriter;
import byre.mqtt.MqttLink;
import byre.rules.ZoneReading;
import byre.units.Quantity;
import java.util.Map;
import java.util.concurrent.ConcurrentHashMap;

/**
 * Republishes zone streams as retained messages under {@code <prefix>/<site>/zones/<zone>/<quantity>}
 * Values are coalesced: only the newest per stream is sent, at most once per flush ({@code mqtt.publish-every},
 * a second unless configured; a central site view is content with a minute), so a burst of readings never
 * turns into a burst of publications.
 */
final class ZoneStreamPublisher implements Pipeline.ZoneListener {
    private final MqttLink link;
    private final String base;
    private final Map<String, ZoneReading> pending = new ConcurrentHashMap<>();
    private final Map<String, String> lastSent = new ConcurrentHashMap<>();
    /** Topic per zone and quantity, built once: offer runs for every derived value of every reading. */
    private final Map<String, Map<Quantity, String>> topics = new ConcurrentHashMap<>();
    private final Cadence flushes;
    private final java.time.Duration every;
    /** The turn at which the oldest value waiting to be sent came (pipeline thread only); null when none waits. */
    private java.time.Instant waitingSince;

    ZoneStreamPublisher(MqttLink link, String prefix, String site, java.time.Duration every) {
        this.flushes = new Cadence(every, every.multipliedBy(10));
        this.every = every;
        this.link = link;
        this.base = prefix + "/" + site + "/zones/";
    }

    /** Keeps the newest value per stream; the JSON is made at flush, once per stream and second at most. */
    @Override
    public void accept(ZoneReading r) {
        offer(r);
    }

    /** Flushes at most once per interval. */
    @Override
    public void tick(java.time.Instant now) {
        if (flushes.due(now)) flush();
    }

    /**
     * While values wait: at the latest one interval after the oldest came (and not before the interval since the last
     * flush has passed). The turns of the readings flush sooner once that interval has passed, so that a steady
     * trickle of readings needs no wake-up of its own for the flushes. Nothing while disconnected: the connection
     * sends everything when it comes back ({@link #republishAll()}).
     */
    @Override
    public java.time.Instant nextTick(java.time.Instant now) {
        if (pending.isEmpty()) {
            waitingSince = null;
            return null;
        }
        if (!link.isConnected()) return null;
        if (waitingSince == null) waitingSince = now;
        java.time.Instant latest = waitingSince.plus(every);
        java.time.Instant allowed = flushes.nextAt(now);
        return allowed.isAfter(latest) ? allowed : latest;
    }

    void offer(ZoneReading r) {
        String topic = topics.computeIfAbsent(r.zone(), z -> new ConcurrentHashMap<>())
                .computeIfAbsent(r.quantity(), q -> base + r.zone() + "/" + q.id());
        pending.put(topic, r);
    }

    static String json(ZoneReading r) {
        return new JsonWriter()
                .field("value", Math.round(r.value() * 100.0) / 100.0)
                .field("unit", r.quantity().canonicalUnit().symbol())
                .field("at", r.at().toString())
                .toString();
    }

    /** Sends what changed since the last flush; on reconnect, {@link #republishAll()} sends everything. */
    void flush() {
        if (!link.isConnected()) return;
        for (String topic : pending.keySet()) {
            ZoneReading r = pending.remove(topic);
            if (r == null) continue;
            String json = json(r);
            if (link.publish(topic, json, 1, true)) lastSent.put(topic, json);
        }
    }

    void republishAll() {
        if (!link.isConnected()) return;
        lastSent.forEach((topic, json) -> {
            if (!pending.containsKey(topic)) link.publish(topic, json, 1, true);
        });
        flush();
    }
}
