package byre.daemon;

import byre.config.ByreConfig;
import byre.config.SensorConfig;
import byre.config.ZoneConfig;
import byre.history.HistoryReader;
import byre.history.HistoryRow;
import byre.history.StreamKey;
import byre.units.Quantity;
import java.nio.file.Files;
import java.time.Duration;
import java.time.Instant;
import java.util.ArrayList;
import java.util.Collections;
import java.util.EnumMap;
import java.util.HashMap;
import java.util.List;
import java.util.Map;

/**
 * How often each zone's streams really report, learnt from the raw readings of the last day (median
 * gap between a sensor's readings), so that the rule checker can warn about a hold time shorter than
 * one reading. A derived quantity reports as often as the slowest sensor of its zone. Nothing is known
 * for a new install (no history yet): then there is simply no warning.
 */
public final class ReportingIntervals {
    static final Duration LOOK_BACK = Duration.ofDays(1);
    static final int MIN_GAPS = 5;

    private ReportingIntervals() {}

    /** Intervals keyed by zone, then quantity; empty when there is no history database. */
    public static Map<String, Map<Quantity, Duration>> fromHistory(ByreConfig config, Instant now) {
        if (!Files.isRegularFile(config.history().path())) return Map.of();
        try (HistoryReader r = HistoryReader.openReadOnly(config.history().path())) {
            return from(r, config, now);
        } catch (RuntimeException e) {
            return Map.of();
        }
    }

    static Map<String, Map<Quantity, Duration>> from(HistoryReader r, ByreConfig config, Instant now) {
        Map<String, Map<Quantity, Duration>> out = new HashMap<>();
        for (ZoneConfig z : config.zones().values()) {
            Map<Quantity, Duration> byQuantity = new EnumMap<>(Quantity.class);
            Duration slowest = null;
            for (String sensor : z.sensors()) {
                SensorConfig s = config.sensors().get(sensor);
                if (s == null) continue;
                Duration median = medianGap(r.raw(StreamKey.sensor(sensor), now.minus(LOOK_BACK), now));
                if (median == null) continue;
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

    static Duration medianGap(List<HistoryRow> rows) {
        if (rows.size() <= MIN_GAPS) return null;
        List<Long> gaps = new ArrayList<>();
        for (int i = 1; i < rows.size(); i++) gaps.add(rows.get(i).at().toEpochMilli() - rows.get(i - 1).at().toEpochMilli());
        Collections.sort(gaps);
        return Duration.ofMillis(gaps.get(gaps.size() / 2));
    }
}
