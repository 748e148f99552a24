package byre.daemon;

import byre.config.ByreConfig;
import byre.config.SensorConfig;
import byre.config.ZoneConfig;
import byre.history.HistoryReader;
import byre.history.StreamKey;
import byre.units.Quantity;
import java.nio.file.Files;
import java.time.Duration;
import java.time.Instant;
import java.util.EnumMap;
import java.util.HashMap;
import java.util.Map;

/**
 * How often each zone's streams really report, learnt from the raw readings of the last day (median
 * gap between a sensor's readings), so that the rule checker can warn about a hold time shorter than
 * one reading and a zone without a {@code max-age} gets one that fits its sensors ({@link Freshness}).
 * A derived quantity reports as often as the slowest sensor of its zone. Nothing is known for a new
 * install (no history yet): then there is no warning and the fixed default max-age applies.
 */
public final class ReportingIntervals {
    static final Duration LOOK_BACK = Duration.ofDays(1);
    static final int MIN_GAPS = 5;
    /**
     * Readings per sensor the median is taken over: the newest of the last day. Enough to see through a few missed
     * reports, and bounded, because this runs at every start and reload: a day of a sensor that reports every
     * second is 86,400 rows, and 200 of them would take seconds and much of the heap on a Pi.
     */
    static final int SAMPLE = 241;

    private ReportingIntervals() {}

    /** Each configured sensor's median gap over the last day; sensors with too few readings are left out. */
    public static Map<String, Duration> sensorsFromHistory(ByreConfig config, Instant now) {
        if (!Files.isRegularFile(config.history().path())) return Map.of();
        try (HistoryReader r = HistoryReader.openReadOnly(config.history().path())) {
            return sensors(r, config, now);
        } catch (RuntimeException e) {
            return Map.of();
        }
    }

    static Map<String, Map<Quantity, Duration>> from(HistoryReader r, ByreConfig config, Instant now) {
        return byZone(config, sensors(r, config, now));
    }

    /** Each configured sensor's median gap over the day before {@code now}, from an open reader. */
    public static Map<String, Duration> sensors(HistoryReader r, ByreConfig config, Instant now) {
        Map<String, Duration> out = new HashMap<>();
        for (ZoneConfig z : config.zones().values()) {
            for (String sensor : z.sensors()) {
                if (config.sensors().get(sensor) == null) continue;
                long[] times = r.latestTimes(StreamKey.sensor(sensor), now.minus(LOOK_BACK), now, SAMPLE);
                Duration median = medianGap(times, times.length);
                if (median != null) out.put(sensor, median);
            }
        }
        return out;
    }

    /** Per zone and quantity from the sensors' intervals; a derived quantity reports as often as the zone's slowest sensor. */
    public static Map<String, Map<Quantity, Duration>> byZone(ByreConfig config, Map<String, Duration> sensorIntervals) {
        Map<String, Map<Quantity, Duration>> out = new HashMap<>();
        for (ZoneConfig z : config.zones().values()) {
            Map<Quantity, Duration> byQuantity = new EnumMap<>(Quantity.class);
            Duration slowest = null;
            for (String sensor : z.sensors()) {
                SensorConfig s = config.sensors().get(sensor);
                Duration median = sensorIntervals.get(sensor);
                if (s == null || median == null) continue;
                byQuantity.merge(s.quantity(), median, (a, b) -> a.compareTo(b) >= 0 ? a : b);
                if (slowest == null || median.compareTo(slowest) > 0) slowest = median;
            }
            if (slowest != null) {
                for (Quantity q : Quantity.values()) if (!q.measurable()) byQuantity.putIfAbsent(q, slowest);
            }
            if (!byQuantity.isEmpty()) out.put(z.id(), byQuantity);
        }
        return out;
    }

    /** The median gap between successive times (in order), or null with too few of them to tell. */
    public static Duration medianGap(long[] timesMs, int n) {
        if (n <= MIN_GAPS) return null;
        long[] gaps = new long[n - 1];
        for (int i = 1; i < n; i++) gaps[i - 1] = timesMs[i] - timesMs[i - 1];
        java.util.Arrays.sort(gaps);
        return Duration.ofMillis(gaps[gaps.length / 2]);
    }
}
