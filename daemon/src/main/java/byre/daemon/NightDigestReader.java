package byre.daemon;

import byre.alerts.NightDigest;
import byre.climate.ThiScale;
import byre.config.ByreConfig;
import byre.config.ZoneConfig;
import byre.history.HistoryReader;
import byre.history.HistoryRow;
import byre.history.HistoryStore;
import byre.history.Resolution;
import byre.history.RollupRow;
import byre.history.StreamKey;
import byre.units.Quantity;
import java.time.Duration;
import java.time.Instant;
import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.Optional;
import java.util.function.BiFunction;

/** Gathers a night for the morning digest from the history: extremes, hours per THI category, silent sensors. */
final class NightDigestReader {
    static final List<Quantity> KEY = List.of(Quantity.DRY_BULB, Quantity.RH, Quantity.THI, Quantity.WIND_CHILL);

    private NightDigestReader() {}

    static NightDigest read(HistoryStore store, ByreConfig config, Instant from, Instant to,
                            BiFunction<Instant, Instant, List<NightDigest.IncidentSpan>> incidents) {
        List<NightDigest.ZoneNight> zones = new ArrayList<>();
        List<String> silent = new ArrayList<>();
        try (HistoryReader r = store.openReader()) {
            for (ZoneConfig z : config.zones().values()) {
                Map<String, double[]> extremes = new LinkedHashMap<>();
                Map<String, String> units = new LinkedHashMap<>();
                for (Quantity q : KEY) {
                    List<RollupRow> rows = r.rollups(StreamKey.zone(z.id(), q), Resolution.MINUTE, from, to);
                    if (rows.isEmpty()) continue;
                    double lo = Double.POSITIVE_INFINITY;
                    double hi = Double.NEGATIVE_INFINITY;
                    for (RollupRow row : rows) {
                        lo = Math.min(lo, row.min());
                        hi = Math.max(hi, row.max());
                    }
                    extremes.put(q.id(), new double[] {lo, hi});
                    units.put(q.id(), q.canonicalUnit().symbol());
                }
                Map<String, Duration> categories = new LinkedHashMap<>();
                for (RollupRow row : r.rollups(StreamKey.zone(z.id(), Quantity.THI), Resolution.MINUTE, from, to)) {
                    categories.merge(ThiScale.LWSI.category(row.mean()), row.width(), Duration::plus);
                }
                zones.add(new NightDigest.ZoneNight(z.id(), extremes, units, categories));
                for (String s : z.sensors()) {
                    Optional<HistoryRow> last = r.latest(StreamKey.sensor(s));
                    if (last.isEmpty() || last.get().at().isBefore(to.minus(z.maxAge()))) silent.add(s);
                }
            }
        }
        return new NightDigest(from, to, zones, incidents.apply(from, to), silent);
    }
}
