package byre.daemon;

import byre.json.JsonWriter;
import byre.mqtt.MqttLink;
import byre.rules.ZoneReading;
import java.util.Map;
import java.util.concurrent.ConcurrentHashMap;

/**
 * Republishes zone streams as retained messages under {@code <prefix>/<site>/zones/<zone>/<quantity>}
 * (design section 7). Values are coalesced: only the newest per stream is sent, at most once per
 * flush, so a burst of readings never turns into a burst of publications.
 */
final class ZoneStreamPublisher {
    private final MqttLink link;
    private final String base;
    private final Map<String, String> pending = new ConcurrentHashMap<>();
    private final Map<String, String> lastSent = new ConcurrentHashMap<>();

    ZoneStreamPublisher(MqttLink link, String prefix, String site) {
        this.link = link;
        this.base = prefix + "/" + site + "/zones/";
    }

    void offer(ZoneReading r) {
        String json = new JsonWriter()
                .field("value", Math.round(r.value() * 100.0) / 100.0)
                .field("unit", r.quantity().canonicalUnit().symbol())
                .field("at", r.at().toString())
                .toString();
        pending.put(base + r.zone() + "/" + r.quantity().id(), json);
    }

    /** Sends what changed since the last flush; on reconnect, {@link #republishAll()} sends everything. */
    void flush() {
        if (!link.isConnected()) return;
        for (String topic : pending.keySet()) {
            String json = pending.remove(topic);
            if (json != null && link.publish(topic, json, 1, true)) lastSent.put(topic, json);
        }
    }

    void republishAll() {
        lastSent.forEach((topic, json) -> pending.putIfAbsent(topic, json));
        flush();
    }
}
