package byre.demo;

import java.nio.file.Path;
import java.util.Locale;

/**
 * Naming of the load generator's sensors and zones, and the byre configuration that matches them,
 * so that a benchmark can start byre against {@link LoadMain}'s traffic.
 *
 * <p>Sensor {@code i} (0-based) of M is {@code s0001 ..} ({@link #sensorId}), lives in zone
 * {@code i % Z} ({@code z01 ..}), and publishes on {@code <prefix>/<zone>/<sensor>} a JSON
 * payload {@code {"v":21.37,"ts":1778583600123}} (epoch milliseconds, distinct per sensor, so every reading
 * is its own history row) read with {@code payload: "json:v"} and {@code time: "json:ts"}. Within a zone
 * the sensors cycle through dry-bulb (C), rh (%) and air-speed (m/s), so a zone with three
 * sensors derives the full set of indices that need no wet bulb; a zone with more than three
 * repeats those quantities.
 */
public final class LoadConfig {
    private static final String[] QUANTITIES = {"dry-bulb", "rh", "air-speed"};
    private static final String[] UNITS = {"C", "\"%\"", "m/s"};

    private LoadConfig() {}

    public static String sensorId(int index, int sensors) {
        return "s" + pad(index + 1, sensors);
    }

    public static String zoneId(int zone, int zones) {
        return "z" + pad(zone + 1, zones);
    }

    public static int zoneOf(int index, int zones) { return index % zones; }

    /** Quantity of sensor {@code index}: its position within its zone picks dry-bulb, rh, air-speed in turn. */
    public static String quantityOf(int index, int zones) { return QUANTITIES[(index / zones) % QUANTITIES.length]; }

    public static String topic(String prefix, int index, int sensors, int zones) {
        return prefix + "/" + zoneId(zoneOf(index, zones), zones) + "/" + sensorId(index, sensors);
    }

    /** A plausible reading for sensor {@code index}, message number {@code n}: two decimals, varying slowly. */
    public static String payload(int index, long n, long epochMillis, int zones) {
        double wobble = Math.sin((n + index * 7L) / 50.0);
        double v;
        switch ((index / zones) % QUANTITIES.length) {
            case 0: v = 21.37 + 1.5 * wobble; break;
            case 1: v = 60.0 + 8.0 * wobble; break;
            default: v = 1.0 + 0.4 * wobble; break;
        }
        return "{\"v\":" + String.format(Locale.ROOT, "%.2f", v) + ",\"ts\":" + epochMillis + "}";
    }

    /** Configuration with defaults: topic prefix {@code load}, rules {@code rules.d}, history {@code load-history.db}. */
    public static String yaml(int sensors, int zones, String broker) {
        return yaml(sensors, zones, broker, null, "load", Path.of("rules.d"), Path.of("load-history.db"));
    }

    /**
     * @param broker {@code tcp://host:port} or {@code embedded}
     * @param listen {@code host:port} for an embedded broker; ignored otherwise (may be null)
     * @throws IllegalArgumentException when there are no sensors, no zones, or more zones than sensors
     */
    public static String yaml(int sensors, int zones, String broker, String listen, String topicPrefix,
                              Path rules, Path history) {
        check(sensors, zones);
        StringBuilder y = new StringBuilder();
        y.append("# byre configuration for a load test: ").append(sensors).append(" sensors in ").append(zones)
                .append(" zones, written by byre.demo.LoadConfig to match byre.demo.LoadMain.\n");
        y.append("site: loadtest\ntimezone: UTC\nunits: metric\n\n");
        y.append("mqtt:\n  broker: ").append(broker).append('\n');
        if ("embedded".equals(broker)) y.append("  listen: ").append(listen == null ? "127.0.0.1:1883" : listen).append('\n');
        y.append("  client-id: ").append(PahoSink.uniqueClientId("byre-load")).append('\n');
        y.append("  publish-prefix: byre\n\nsensors:\n");
        for (int i = 0; i < sensors; i++) {
            int q = (i / zones) % QUANTITIES.length;
            y.append("  ").append(sensorId(i, sensors)).append(": { topic: ").append(topic(topicPrefix, i, sensors, zones))
                    .append(", quantity: ").append(QUANTITIES[q]).append(", unit: ").append(UNITS[q])
                    .append(", payload: \"json:v\", time: \"json:ts\" }\n");
        }
        y.append("\nzones:\n");
        for (int z = 0; z < zones; z++) {
            y.append("  ").append(zoneId(z, zones)).append(":\n    groups: [load]\n    sensors: [");
            for (int i = z; i < sensors; i += zones) {
                if (i > z) y.append(", ");
                y.append(sensorId(i, sensors));
            }
            y.append("]\n    elevation: 0 m\n    max-age: 5m\n");
        }
        y.append("\nnotify:\n  bench-sink: { type: command, argv: [/bin/true] }\n\n");
        y.append("rules: ").append(DemoConfig.quoted(rules.toString())).append("\n\n");
        y.append("history:\n  path: ").append(DemoConfig.quoted(history.toString()))
                .append("\n  keep-raw: 14d\n  keep-minute: 90d\n  keep-hour: 5y\n");
        return y.toString();
    }

    static void check(int sensors, int zones) {
        if (sensors < 1) throw new IllegalArgumentException("--sensors must be at least 1, got " + sensors);
        if (zones < 1) throw new IllegalArgumentException("--zones must be at least 1, got " + zones);
        if (zones > sensors) {
            throw new IllegalArgumentException("--zones (" + zones + ") cannot exceed --sensors (" + sensors + "): every zone needs a sensor");
        }
    }

    private static String pad(int n, int max) {
        int width = Math.max(2, Integer.toString(max).length());
        return String.format(Locale.ROOT, "%0" + width + "d", n);
    }
}
