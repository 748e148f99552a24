package byre.cli;

import byre.admin.OpenAlert;
import byre.config.ByreConfig;
import byre.config.SensorConfig;
import byre.config.ZoneConfig;
import byre.history.HistoryException;
import byre.history.HistoryReader;
import byre.history.HistoryRow;
import byre.history.RollupRow;
import byre.history.StreamKey;
import byre.units.Quantity;
import java.time.Clock;
import java.time.Duration;
import java.time.Instant;
import java.time.temporal.ChronoUnit;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.EnumMap;
import java.util.HashMap;
import java.util.List;
import java.util.Map;
import java.util.concurrent.Callable;
import picocli.CommandLine.Command;
import picocli.CommandLine.Mixin;
import picocli.CommandLine.Option;

/**
 * {@code byre status}: one screen for SSH. Reads the history database directly (read-only, safe while the daemon
 * writes) and, when the daemon's admin API answers, its health and open alerts.
 */
@Command(name = "status", mixinStandardHelpOptions = true,
        description = "Current values and their age, open alerts, silent sensors and 24 h trends.")
final class StatusCommand implements Callable<Integer> {
    /** State-table key of the open incidents, read when the daemon is not answering. */
    static final String ALERT_STATE_KEY = byre.notify.AlertService.STATE_KEY;
    static final Duration DEFAULT_MAX_AGE = Duration.ofMinutes(5);

    @Mixin
    ConfigOption config;

    @Option(names = "--no-color", description = "Plain text even on a terminal (also: NO_COLOR=1).")
    boolean noColour;

    @Option(names = "--site", paramLabel = "SITE", description = "On a central byre: only this site's zones and alerts.")
    String site;

    @Override
    public Integer call() {
        ByreConfig loaded = config.load(System.err);
        if (loaded == null) return Main.USAGE;
        // A central byre's sites found on the broker are in its history, with their zones.
        ByreConfig cfg = byre.central.FoundSites.readStored(loaded);
        if (site != null && !cfg.central().siteIds().contains(site)) {
            System.err.println("byre: --site " + site + ": not a site of this central byre's configuration"
                    + byre.units.Suggest.hint(site, cfg.central().siteIds())
                    + (cfg.central().enabled() ? "; sites: " + String.join(", ", cfg.central().siteIds()) : " (it has no central: section)"));
            return Main.USAGE;
        }
        Instant now = Clock.systemUTC().instant();
        StatusData.Daemon daemon = StatusData.Daemon.UNREACHABLE;
        AdminClient.Live live = null;
        if (cfg.admin().enabled()) {
            AdminClient client = new AdminClient(cfg.admin());
            daemon = client.health();
            if (daemon.reachable()) live = client.status();
        }
        StatusData data;
        try (HistoryReader r = HistoryReader.openReadOnly(cfg.history().path())) {
            data = gather(cfg, r, now, daemon, live);
            if (site != null) data = forSite(data, site);
        } catch (HistoryException e) {
            System.err.println("byre: " + e.getMessage());
            return Main.FAILURE;
        }
        System.out.print(StatusScreen.render(cfg, data, now, !noColour && Terminal.colourOnStdout(System.getenv())));
        return Main.OK;
    }

    /**
     * Collects what the screen shows. {@code live} is the daemon's answer (null when it did not answer): its values
     * are newer than the database's (zone streams are stored once a minute), and its alerts replace the state table's.
     */
    static StatusData gather(ByreConfig configured, HistoryReader r, Instant now, StatusData.Daemon daemon, AdminClient.Live live) {
        // Stale and silent by the max-ages the daemon uses: zones without one follow their sensors' intervals.
        ByreConfig cfg = byre.daemon.Freshness.resolve(configured, byre.daemon.ReportingIntervals.sensors(r, configured, now));
        List<OpenAlert> liveAlerts = live == null ? null : live.alerts();
        Map<String, HistoryRow> latest = new HashMap<>();
        for (HistoryRow row : r.latest()) latest.put(row.stream().toString(), row);

        List<StatusData.Zone> zones = new ArrayList<>();
        Instant trendTo = now.truncatedTo(ChronoUnit.HOURS).plus(1, ChronoUnit.HOURS);
        Instant trendFrom = trendTo.minus(StatusScreen.TREND_HOURS, ChronoUnit.HOURS);
        for (ZoneConfig z : cfg.zones().values()) {
            Map<Quantity, StatusData.Value> values = new EnumMap<>(Quantity.class);
            Map<Quantity, double[]> trends = new EnumMap<>(Quantity.class);
            for (Quantity q : Quantity.values()) {
                HistoryRow row = latest.get(StreamKey.zone(z.id(), q).toString());
                if (row == null) continue;
                values.put(q, new StatusData.Value(row.value(), row.at()));
                if (StatusScreen.TREND_KEYS.contains(q)) {
                    double[] cells = new double[StatusScreen.TREND_HOURS];
                    Arrays.fill(cells, Double.NaN);
                    for (RollupRow b : r.buckets(StreamKey.zone(z.id(), q), Duration.ofHours(1), trendFrom, trendTo)) {
                        int i = (int) Duration.between(trendFrom, b.start()).toHours();
                        if (i >= 0 && i < cells.length) cells[i] = b.mean();
                    }
                    trends.put(q, cells);
                }
            }
            if (live != null && live.values().containsKey(z.id())) {
                live.values().get(z.id()).forEach((q, v) -> values.merge(q, v, (db, lv) -> lv.at().isBefore(db.at()) ? db : lv));
            }
            zones.add(new StatusData.Zone(z.id(), z.groups(), z.maxAge() == null ? DEFAULT_MAX_AGE : z.maxAge(), values, trends));
        }

        List<StatusData.Silent> silent = new ArrayList<>();
        for (SensorConfig s : cfg.sensors().values()) {
            // A site's zone mirrors only the streams that site publishes: the rest are not silent, they do not exist.
            if (isCentral(cfg, s)) continue;
            ZoneConfig zone = cfg.zones().values().stream().filter(z -> z.sensors().contains(s.id())).findFirst().orElse(null);
            Duration maxAge = zone == null || zone.maxAge() == null ? DEFAULT_MAX_AGE : zone.maxAge();
            Instant last = null;
            for (HistoryRow row : latest.values()) {
                if (row.stream().kind() != StreamKey.Kind.SENSOR) continue;
                String n = row.stream().name();
                if (n.equals(s.id()) || (s.isFamily() && n.startsWith(s.id() + "/"))) {
                    if (last == null || row.at().isAfter(last)) last = row.at();
                }
            }
            if (last == null || Duration.between(last, now).compareTo(maxAge) > 0) {
                silent.add(new StatusData.Silent(s.id(), zone == null ? null : zone.id(), last));
            }
        }

        List<OpenAlert> alerts;
        String from;
        if (liveAlerts != null) {
            alerts = liveAlerts;
            from = "from the daemon";
        } else {
            alerts = alertsFromState(r.state(ALERT_STATE_KEY).get(ALERT_STATE_KEY));
            if (cfg.central().enabled()) alerts = withSiteAlerts(alerts, r);
            from = alerts.isEmpty() && daemon.reachable() ? null : "from the database";
            if (!daemon.reachable()) from = "from the database; the daemon is not answering";
        }
        return new StatusData(daemon, zones, alerts, from, silent);
    }

    /** A central byre's own alerts and, from the stored events, its sites' open ones (the daemon is not answering). */
    private static List<OpenAlert> withSiteAlerts(List<OpenAlert> own, HistoryReader r) {
        try {
            List<OpenAlert> all = new ArrayList<>(own);
            all.addAll(byre.central.SiteEventLog.storedOpenAlerts(r.connection()));
            return all;
        } catch (java.sql.SQLException e) {
            System.err.println("byre: cannot read the sites' events from the history: " + e.getMessage());
            return own;
        }
    }

    private static boolean isCentral(ByreConfig cfg, SensorConfig s) {
        if (!cfg.central().enabled()) return false;
        int slash = s.id().lastIndexOf('/');
        String zone = slash > 0 ? s.id().substring(0, slash) : s.id();
        return cfg.central().isMirroredZone(zone) || cfg.central().isSiteZone(zone);
    }

    /** One site of a central byre: its own zone, its zones ({@code <site>/…}), and alerts in them. */
    static StatusData forSite(StatusData d, String site) {
        java.util.function.Predicate<String> ofSite = z -> z != null && (z.equals(site) || z.startsWith(site + "/"));
        return new StatusData(d.daemon(), d.zones().stream().filter(z -> ofSite.test(z.id())).toList(),
                d.alerts().stream().filter(a -> ofSite.test(a.zone())).toList(), d.alertsFrom(),
                d.silent().stream().filter(s -> ofSite.test(s.zone())).toList());
    }

    /** Open alerts from the alert stage's stored incidents; an unreadable snapshot shows none. */
    static List<OpenAlert> alertsFromState(String snapshot) {
        if (snapshot == null) return List.of();
        byre.alerts.IncidentBook book = new byre.alerts.IncidentBook("", byre.alerts.IdSource.random());
        if (book.restore(snapshot) != null) return List.of();
        return book.openIncidents().stream().map(OpenAlert::of).toList();
    }
}
