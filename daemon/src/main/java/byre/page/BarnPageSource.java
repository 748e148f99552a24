package byre.page;

import byre.admin.LiveValues;
import byre.alerts.OpenIncident;
import byre.config.ByreConfig;
import byre.config.CentralSettings;
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
import java.util.Collection;
import java.util.EnumMap;
import java.util.HashMap;
import java.util.List;
import java.util.Map;
import java.util.function.Function;
import java.util.function.Supplier;

/**
 * Gathers the barn page from the running daemon: the newest values (the daemon's live ones, else the history's), the
 * trends from the history's minute rollups, the open incidents, and the sensors that went quiet. Trends change
 * slowly and cost a query per stream, so each zone's are kept for a minute; the rest is read on every request.
 * A central byre's pages ask for some zones only (one site's, or the key values of every site's).
 */
final class BarnPageSource {
    /** The quantities drawn as 24-hour trends, in the order shown. */
    static final List<Quantity> TREND_KEYS = List.of(Quantity.THI, Quantity.DRY_BULB);
    /** The quantities a zone card shows: THI on its own line, then the grid. */
    static final List<Quantity> SHOWN = java.util.stream.Stream.concat(java.util.stream.Stream.of(Quantity.THI),
            BarnPageHtml.TILES.stream()).toList();
    static final Duration TREND_SPAN = Duration.ofHours(24);
    static final Duration TREND_STEP = Duration.ofMinutes(15);
    static final int TREND_CELLS = (int) (TREND_SPAN.toMinutes() / TREND_STEP.toMinutes());
    static final Duration DEFAULT_MAX_AGE = Duration.ofMinutes(5);
    private static final Duration TREND_KEEP = Duration.ofMinutes(1);

    private record Trends(Instant at, Map<Quantity, double[]> cells) {}

    private final ByreConfig config;
    private final LiveValues live;
    private final Supplier<HistoryReader> readers;
    private final Supplier<List<OpenIncident>> open;
    private final Supplier<CentralSettings> central;
    private final Map<String, Trends> trends = new HashMap<>();

    /**
     * @param readers opens a read-only history connection (closed after each use)
     * @param open    the alert stage's open incidents, oldest first
     */
    BarnPageSource(ByreConfig config, LiveValues live, Supplier<HistoryReader> readers, Supplier<List<OpenIncident>> open) {
        this(config, live, readers, open, config::central);
    }

    /** @param central a central byre's sites as now known (it finds more while it runs) */
    BarnPageSource(ByreConfig config, LiveValues live, Supplier<HistoryReader> readers, Supplier<List<OpenIncident>> open,
                   Supplier<CentralSettings> central) {
        this.config = config;
        this.live = live;
        this.readers = readers;
        this.open = open;
        this.central = central;
    }

    /** The page's content at {@code now}; a history that cannot be read leaves trends out and says so. */
    synchronized BarnView gather(Instant now) {
        List<OpenIncident> alerts = open.get();
        Map<String, HistoryRow> latest = new HashMap<>();
        List<BarnView.Zone> zones;
        String problem = null;
        try (HistoryReader r = readers.get()) {
            for (HistoryRow row : r.latest()) latest.put(row.stream().toString(), row);
            zones = zones(config.zones().values(), List.of(Quantity.values()), k -> latest.get(k.toString()), r, now);
        } catch (HistoryException e) {
            problem = "the history cannot be read: " + e.getMessage();
            zones = zones(config.zones().values(), List.of(Quantity.values()), k -> null, null, now);
        }
        return new BarnView(zones, alerts, silent(latest, now), problem);
    }

    /**
     * Some zones with the values a zone card shows and their trends (a central site's page), reading only their
     * streams; {@code alerts} as given. The central byre's own zones also get its silent sensors. A history that
     * cannot be read leaves values and trends out and says so.
     */
    synchronized BarnView gather(Collection<ZoneConfig> some, List<OpenIncident> alerts, Instant now, BarnView.SiteState state) {
        try (HistoryReader r = readers.get()) {
            List<BarnView.Silent> silent = List.of();
            if (state.self()) {
                Map<String, HistoryRow> latest = new HashMap<>();
                for (HistoryRow row : r.latest()) latest.put(row.stream().toString(), row);
                silent = silent(latest, now);
            }
            return new BarnView(zones(some, SHOWN, k -> r.latest(k).orElse(null), r, now), alerts, silent, null, state);
        } catch (HistoryException e) {
            return new BarnView(zones(some, SHOWN, k -> null, null, now), alerts, List.of(), "the history cannot be read: " + e.getMessage(), state);
        }
    }

    /** Some zones with only {@code quantities}, without trends (the list of sites); the history only where nothing is live. */
    List<BarnView.Zone> newest(Collection<ZoneConfig> some, List<Quantity> quantities, HistoryReader r) {
        return zones(some, quantities, k -> r == null ? null : r.latest(k).orElse(null), null, null);
    }

    /** Trends are read when {@code trendsFrom} is given. */
    private List<BarnView.Zone> zones(Collection<ZoneConfig> some, List<Quantity> quantities, Function<StreamKey, HistoryRow> stored,
                                      HistoryReader trendsFrom, Instant now) {
        List<BarnView.Zone> out = new ArrayList<>();
        for (ZoneConfig z : some) {
            Map<Quantity, BarnView.Value> values = new EnumMap<>(Quantity.class);
            for (Quantity q : quantities) {
                // A live value came through the pipeline since start, so it is as new as the stored one or newer
                // (zone streams are stored once a minute): only where nothing is live is the history asked.
                ZoneReading lv = live == null ? null : live.get(z.id(), q);
                HistoryRow row = lv != null ? null : stored.apply(key(z.id(), q));
                if (lv != null) {
                    values.put(q, new BarnView.Value(lv.value(), lv.at()));
                } else if (row != null) {
                    values.put(q, new BarnView.Value(row.value(), row.at()));
                }
            }
            Map<Quantity, double[]> t = trendsFrom == null ? Map.of() : trends(trendsFrom, z.id(), now);
            out.add(new BarnView.Zone(z.id(), z.groups(), maxAge(z), values, t));
        }
        return out;
    }

    /** A zone's trends, read again when older than a minute. */
    private Map<Quantity, double[]> trends(HistoryReader r, String zone, Instant now) {
        Trends t = trends.get(zone);
        if (t == null || now.isBefore(t.at()) || !now.isBefore(t.at().plus(TREND_KEEP))) {
            t = new Trends(now, readTrends(r, zone, now));
            trends.put(zone, t);
        }
        return t.cells();
    }

    private Map<Quantity, double[]> readTrends(HistoryReader r, String zone, Instant now) {
        long step = TREND_STEP.toMillis();
        Instant to = Instant.ofEpochMilli(Math.floorDiv(now.toEpochMilli(), step) * step + step); // the bucket now in
        Instant from = to.minus(TREND_SPAN);
        Map<Quantity, double[]> per = new EnumMap<>(Quantity.class);
        for (Quantity q : TREND_KEYS) {
            double[] cells = new double[TREND_CELLS];
            Arrays.fill(cells, Double.NaN);
            boolean any = false;
            for (RollupRow b : r.buckets(key(zone, q), TREND_STEP, from, to)) {
                int i = (int) (Duration.between(from, b.start()).toMillis() / step);
                if (i >= 0 && i < cells.length) {
                    cells[i] = b.mean();
                    any = true;
                }
            }
            if (any) per.put(q, cells);
        }
        return per;
    }

    /**
     * Where a stream is stored: a zone's own stream, or for a zone that mirrors a site (central byre) the stream its
     * site published, which holds every value as sent, also those too old to count as live when they arrived (a site
     * that went quiet before the centre started).
     */
    private StreamKey key(String zone, Quantity q) {
        return central.get().isMirroredZone(zone) ? StreamKey.sensor(CentralSettings.mirrorSensor(zone, q)) : StreamKey.zone(zone, q);
    }

    /** Sensors with no stored reading within their zone's max-age (the same test as {@code byre status}). */
    private List<BarnView.Silent> silent(Map<String, HistoryRow> latest, Instant now) {
        List<BarnView.Silent> out = new ArrayList<>();
        for (SensorConfig s : config.sensors().values()) {
            ZoneConfig zone = config.zones().values().stream().filter(z -> z.sensors().contains(s.id())).findFirst().orElse(null);
            // A central byre's site zones mirror what their sites publish: their streams are not sensors of this barn.
            if (zone != null && (config.central().isMirroredZone(zone.id()) || config.central().isSiteZone(zone.id()))) continue;
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

    static Duration maxAge(ZoneConfig z) {
        return z.maxAge() == null ? DEFAULT_MAX_AGE : z.maxAge();
    }
}
