package byre.page;

import byre.admin.LiveValues;
import byre.alerts.OpenIncident;
import byre.config.ByreConfig;
import byre.config.SensorConfig;
import byre.config.ZoneConfig;
import byre.history.HistoryException;
import byre.history.HistoryReader;
import byre.history.HistoryRow;
import byre.history.RollupRow;
import byre.history.StreamKey;
import byre.rules.ZoneReading;
import byre.units.Quantity;
import java.time.Duration;
import java.time.Instant;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.EnumMap;
import java.util.HashMap;
import java.util.List;
import java.util.Map;
import java.util.function.Supplier;

/**
 * Gathers the barn page from the running daemon: the newest values (the daemon's live ones, else the history's), the
 * trends from the history's minute rollups, the open incidents, and the sensors that went quiet. Trends change
 * slowly and cost a query per stream, so they are kept for a minute; the rest is read on every request.
 */
final class BarnPageSource {
    /** The quantities drawn as 24-hour trends, in the order shown. */
    static final List<Quantity> TREND_KEYS = List.of(Quantity.THI, Quantity.DRY_BULB);
    static final Duration TREND_SPAN = Duration.ofHours(24);
    static final Duration TREND_STEP = Duration.ofMinutes(15);
    static final int TREND_CELLS = (int) (TREND_SPAN.toMinutes() / TREND_STEP.toMinutes());
    static final Duration DEFAULT_MAX_AGE = Duration.ofMinutes(5);
    private static final Duration TREND_KEEP = Duration.ofMinutes(1);

    private final ByreConfig config;
    private final LiveValues live;
    private final Supplier<HistoryReader> readers;
    private final Supplier<List<OpenIncident>> open;
    private Map<String, Map<Quantity, double[]>> trends = Map.of();
    private Instant trendsAt;

    /**
     * @param readers opens a read-only history connection (closed after each use)
     * @param open    the alert stage's open incidents, oldest first
     */
    BarnPageSource(ByreConfig config, LiveValues live, Supplier<HistoryReader> readers, Supplier<List<OpenIncident>> open) {
        this.config = config;
        this.live = live;
        this.readers = readers;
        this.open = open;
    }

    /** The page's content at {@code now}; a history that cannot be read leaves trends out and says so. */
    synchronized BarnView gather(Instant now) {
        List<OpenIncident> alerts = open.get();
        Map<String, HistoryRow> latest = new HashMap<>();
        String problem = null;
        try (HistoryReader r = readers.get()) {
            for (HistoryRow row : r.latest()) latest.put(row.stream().toString(), row);
            if (trendsAt == null || now.isBefore(trendsAt) || !now.isBefore(trendsAt.plus(TREND_KEEP))) {
                trends = readTrends(r, now);
                trendsAt = now;
            }
        } catch (HistoryException e) {
            problem = "the history cannot be read: " + e.getMessage();
        }
        List<BarnView.Zone> zones = new ArrayList<>();
        for (ZoneConfig z : config.zones().values()) {
            Map<Quantity, BarnView.Value> values = new EnumMap<>(Quantity.class);
            for (Quantity q : Quantity.values()) {
                HistoryRow row = latest.get(StreamKey.zone(z.id(), q).toString());
                ZoneReading lv = live == null ? null : live.get(z.id(), q);
                if (lv != null && (row == null || !lv.at().isBefore(row.at()))) {
                    values.put(q, new BarnView.Value(lv.value(), lv.at()));
                } else if (row != null) {
                    values.put(q, new BarnView.Value(row.value(), row.at()));
                }
            }
            zones.add(new BarnView.Zone(z.id(), z.groups(), maxAge(z), values, trends.getOrDefault(z.id(), Map.of())));
        }
        return new BarnView(zones, alerts, silent(latest, now), problem);
    }

    private Map<String, Map<Quantity, double[]>> readTrends(HistoryReader r, Instant now) {
        long step = TREND_STEP.toMillis();
        Instant to = Instant.ofEpochMilli(Math.floorDiv(now.toEpochMilli(), step) * step + step); // the bucket now in
        Instant from = to.minus(TREND_SPAN);
        Map<String, Map<Quantity, double[]>> out = new HashMap<>();
        for (ZoneConfig z : config.zones().values()) {
            Map<Quantity, double[]> per = new EnumMap<>(Quantity.class);
            for (Quantity q : TREND_KEYS) {
                double[] cells = new double[TREND_CELLS];
                Arrays.fill(cells, Double.NaN);
                boolean any = false;
                for (RollupRow b : r.buckets(StreamKey.zone(z.id(), q), TREND_STEP, from, to)) {
                    int i = (int) (Duration.between(from, b.start()).toMillis() / step);
                    if (i >= 0 && i < cells.length) {
                        cells[i] = b.mean();
                        any = true;
                    }
                }
                if (any) per.put(q, cells);
            }
            out.put(z.id(), per);
        }
        return out;
    }

    /** Sensors with no stored reading within their zone's max-age (the same test as {@code byre status}). */
    private List<BarnView.Silent> silent(Map<String, HistoryRow> latest, Instant now) {
        List<BarnView.Silent> out = new ArrayList<>();
        for (SensorConfig s : config.sensors().values()) {
            ZoneConfig zone = config.zones().values().stream().filter(z -> z.sensors().contains(s.id())).findFirst().orElse(null);
            Instant last = null;
            for (HistoryRow row : latest.values()) {
                if (row.stream().kind() != StreamKey.Kind.SENSOR) continue;
                String n = row.stream().name();
                if ((n.equals(s.id()) || (s.isFamily() && n.startsWith(s.id() + "/"))) && (last == null || row.at().isAfter(last))) {
                    last = row.at();
                }
            }
            if (last == null || Duration.between(last, now).compareTo(zone == null ? DEFAULT_MAX_AGE : maxAge(zone)) > 0) {
                out.add(new BarnView.Silent(s.id(), zone == null ? null : zone.id(), last));
            }
        }
        return out;
    }

    private static Duration maxAge(ZoneConfig z) {
        return z.maxAge() == null ? DEFAULT_MAX_AGE : z.maxAge();
    }
}
