package byre.daemon;

import byre.config.ByreConfig;
import byre.config.SensorConfig;
import byre.config.ZoneConfig;
import byre.units.Quantity;
import java.time.Duration;
import java.util.Map;

/**
 * How long the broker link may be connected without a single message before byre counts itself deaf (and
 * /health and the systemd watchdog say so): {@link #INTERVALS} times the slowest configured sensor's reporting
 * interval, at least {@link #FLOOR}. A sensor's interval is the one learnt from the history; while none is
 * known, its zone's configured max-age stands in (a sensor that reports less often than that is never fresh
 * anyway), or {@link #UNKNOWN_INTERVAL} for a zone whose max-age is itself still to be learnt.
 */
final class QuietLimit {
    static final Duration FLOOR = Duration.ofMinutes(2);
    static final int INTERVALS = 3;
    /** For a sensor with nothing learnt and no max-age configured for its zone. */
    static final Duration UNKNOWN_INTERVAL = Duration.ofMinutes(5);

    private QuietLimit() {}

    static Duration of(ByreConfig config, Map<String, Map<Quantity, Duration>> learnt) {
        Duration slowest = Duration.ZERO;
        boolean anySensor = false;
        for (ZoneConfig z : config.zones().values()) {
            Map<Quantity, Duration> zoneLearnt = learnt.getOrDefault(z.id(), Map.of());
            for (String id : z.sensors()) {
                SensorConfig s = config.sensors().get(id);
                if (s == null) continue;
                anySensor = true;
                // The fixed default max-age of an unlearnt zone is 2 intervals of a 5-minute sensor, not one interval.
                Duration d = zoneLearnt.getOrDefault(s.quantity(), z.maxAgeLearnt() ? UNKNOWN_INTERVAL : z.maxAge());
                if (d.compareTo(slowest) > 0) slowest = d;
            }
        }
        if (!anySensor) slowest = UNKNOWN_INTERVAL;
        Duration limit = slowest.multipliedBy(INTERVALS);
        return limit.compareTo(FLOOR) < 0 ? FLOOR : limit;
    }
}
