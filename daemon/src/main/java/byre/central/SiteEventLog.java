package byre.central;

import byre.admin.OpenAlert;
import byre.alerts.AlertEvent;
import byre.alerts.EventKind;
import byre.alerts.OpenIncident;
import byre.config.CentralSettings;
import java.sql.Connection;
import java.sql.PreparedStatement;
import java.sql.ResultSet;
import java.sql.SQLException;
import java.sql.Statement;
import java.time.Duration;
import java.time.Instant;
import java.util.ArrayList;
import java.util.Iterator;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;

/**
 * The sites' alert events as a central byre received them, in the central history file (table {@code site_event},
 * created by the first central start: a barn's file never has it). Each event is kept once by its id, however often
 * the bridge or the broker delivers it, in the order it first arrived. The open incidents of every site are held in
 * memory (rebuilt from the table at start) for {@code byre status} and for acknowledging from the centre, and corrected
 * by the sites' retained alert states ({@link #apply}), which tell the centre what its events missed.
 */
public final class SiteEventLog implements AutoCloseable {
    /** One event as stored. */
    public record Stored(long seq, String site, AlertEvent event) {}

    /** An open incident of a site and what the centre shows of it. */
    private record Open(String site, OpenIncident incident) {}

    private final Connection conn;
    private final Map<String, Open> open = new LinkedHashMap<>();

    /** Events are kept this long by default (as raw readings are). */
    static final Duration DEFAULT_KEEP = Duration.ofDays(14);
    private static final long PRUNE_EVERY_MS = Duration.ofHours(1).toMillis();

    private final long keepMs;
    private long lastPruneMs = Long.MIN_VALUE;

    /**
     * The sites' open alerts as the stored events tell them, read on {@code readOnly} (which stays the caller's): what
     * {@code byre status} shows of the sites while the central daemon is down. Nothing learnt from alert states, which
     * only the running daemon holds.
     */
    public static List<OpenAlert> storedOpenAlerts(Connection readOnly) throws SQLException {
        try (ResultSet rs = readOnly.getMetaData().getTables(null, null, "site_event", null)) {
            if (!rs.next()) return List.of();
        }
        return new SiteEventLog(readOnly, DEFAULT_KEEP).openAlerts(); // not closed: the connection is the caller's
    }

    /** Uses (and closes) {@code conn}, a synced connection to the central history file; keeps events 14 days. */
    public SiteEventLog(Connection conn) throws SQLException {
        this(conn, DEFAULT_KEEP);
    }

    /**
     * Uses (and closes) {@code conn}, a synced connection to the central history file (whose schema holds the
     * {@code site_event} table). Events older than {@code keep} go once their incident is cleared (and events of
     * no incident); an incident still open keeps all its events, however old.
     */
    public SiteEventLog(Connection conn, Duration keep) throws SQLException {
        this.conn = conn;
        this.keepMs = keep.toMillis();
        // Incidents not cleared yet, replayed in order.
        try (Statement st = conn.createStatement();
             ResultSet rs = st.executeQuery("SELECT seq, site, body FROM site_event WHERE incident NOT IN "
                     + "(SELECT incident FROM site_event WHERE kind = 'cleared' AND incident IS NOT NULL) ORDER BY seq")) {
            while (rs.next()) fold(rs.getString(2), AlertEvent.fromJson(rs.getString(3)));
        }
    }

    /**
     * Stores an event of {@code site} unless one with its id is already stored; the commit is on disk when this
     * returns. True when it was new.
     */
    public boolean record(String site, AlertEvent e, String body, Instant received) throws SQLException {
        synchronized (conn) {
            try (PreparedStatement ps = conn.prepareStatement(
                    "INSERT OR IGNORE INTO site_event(id, site, incident, kind, body, received) VALUES (?, ?, ?, ?, ?, ?)")) {
                ps.setString(1, e.id());
                ps.setString(2, site);
                ps.setString(3, e.incident());
                ps.setString(4, e.kind().id());
                ps.setString(5, body);
                ps.setLong(6, received.toEpochMilli());
                if (ps.executeUpdate() == 0) return false;
            }
            fold(site, e);
            long now = received.toEpochMilli();
            if (lastPruneMs == Long.MIN_VALUE || now - lastPruneMs >= PRUNE_EVERY_MS || now < lastPruneMs) {
                lastPruneMs = now;
                prune(now - keepMs);
            }
            return true;
        }
    }

    /** Deletes the events received before {@code cutoffMs} whose incident is cleared, or that belong to no incident. */
    int prune(long cutoffMs) throws SQLException {
        synchronized (conn) {
            try (PreparedStatement ps = conn.prepareStatement("DELETE FROM site_event WHERE received < ? AND (incident IS NULL OR EXISTS "
                    + "(SELECT 1 FROM site_event c WHERE c.incident = site_event.incident AND c.site = site_event.site AND c.kind = 'cleared'))")) {
                ps.setLong(1, cutoffMs);
                return ps.executeUpdate();
            }
        }
    }

    private void fold(String site, AlertEvent e) {
        if (e.incident() == null) return;
        Open o = open.get(e.incident());
        OpenIncident a = o == null ? null : o.incident();
        switch (e.kind()) {
            case RAISED -> open.put(e.incident(), new Open(site, new OpenIncident(e.incident(), e.watch(), zoneOf(site, e.zone()), e.level(),
                    e.quantity(), e.value(), e.unit(), e.since() != null ? e.since() : e.at(), e.at(), e.message(), List.of(), false, null, null)));
            case ACKNOWLEDGED -> {
                if (a != null) open.put(e.incident(), new Open(site, new OpenIncident(a.id(), a.watch(), a.zone(), a.level(), a.quantity(),
                        a.value(), a.unit(), a.since(), a.raisedAt(), a.message(), a.told(), a.escalated(), e.by(), e.at(), a.fromAlertState())));
            }
            case REMINDER, ESCALATED -> {
                if (a != null) open.put(e.incident(), new Open(site, new OpenIncident(a.id(), a.watch(), a.zone(),
                        e.level() != null ? e.level() : a.level(), a.quantity(), Double.isNaN(e.value()) ? a.value() : e.value(), a.unit(),
                        a.since(), a.raisedAt(), e.message() != null && !e.message().isBlank() ? e.message() : a.message(), a.told(),
                        a.escalated() || e.kind() == EventKind.ESCALATED, a.ackBy(), a.ackAt(), a.fromAlertState())));
            }
            case CLEARED -> open.remove(e.incident());
            case TEST, SUMMARY, DIGEST -> { }
        }
    }

    /** What a site's alert state changed in the centre's view of its open incidents. */
    public record StateChange(List<OpenIncident> added, List<OpenIncident> removed) {
        public boolean none() {
            return added.isEmpty() && removed.isEmpty();
        }
    }

    /**
     * Corrects the open incidents by one alert state of a site. The events stay the record: nothing is stored, the
     * correction lives in memory, and the broker sends every retained state again whenever the centre subscribes.
     * <ul>
     *   <li>A site's byre has at most one incident open per watch and zone, so an incident the centre holds open there
     *       that was raised before the state's incident began is over: its clear was missed.</li>
     *   <li>A cleared state ends its incident, if the centre still holds it open.</li>
     *   <li>An open state adds its incident, marked {@link OpenIncident#fromAlertState()}, unless the centre holds it
     *       already, or has its {@code cleared} event, or holds one there that began after the state was written (then
     *       the state is old).</li>
     *   <li>An emptied slot ends what its earlier state added; an incident its events opened waits for its clear.</li>
     * </ul>
     * An event of an added incident then updates it as any; its {@code cleared} event ends it.
     */
    public StateChange apply(AlertStateMessage s) throws SQLException {
        String zone = zoneOf(s.site(), s.zone());
        AlertEvent e = s.event();
        Instant began = e == null ? null : e.since() != null ? e.since() : e.at();
        // The state was written at e.at(), when its incident was open: an incident that began later is newer.
        Instant written = e == null ? null : e.at() != null ? e.at() : e.since();
        List<OpenIncident> added = new ArrayList<>();
        List<OpenIncident> removed = new ArrayList<>();
        synchronized (conn) {
            boolean newerOpen = false;
            for (Iterator<Open> it = open.values().iterator(); it.hasNext(); ) {
                Open o = it.next();
                OpenIncident i = o.incident();
                if (!o.site().equals(s.site()) || !s.watch().equals(i.watch()) || !zone.equals(i.zone())) continue;
                boolean over;
                if (e == null) over = i.fromAlertState();
                else if (i.id().equals(e.incident())) over = !s.open();
                else over = began != null && i.raisedAt() != null && i.raisedAt().isBefore(began);
                if (over) {
                    it.remove();
                    removed.add(i);
                } else if (written != null && i.since() != null && i.since().isAfter(written)) {
                    newerOpen = true;
                }
            }
            if (s.open() && !newerOpen && !open.containsKey(e.incident()) && !clearedStored(s.site(), e.incident())) {
                OpenIncident i = learnt(zone, e);
                open.put(i.id(), new Open(s.site(), i));
                added.add(i);
            }
        }
        return new StateChange(added, removed);
    }

    /** Whether the {@code cleared} event of a site's incident is stored. */
    private boolean clearedStored(String site, String incident) throws SQLException {
        try (PreparedStatement ps = conn.prepareStatement(
                "SELECT 1 FROM site_event WHERE incident = ? AND site = ? AND kind = 'cleared' LIMIT 1")) {
            ps.setString(1, incident);
            ps.setString(2, site);
            try (ResultSet rs = ps.executeQuery()) {
                return rs.next();
            }
        }
    }

    /** An open incident as its alert state tells it (a {@code raised} event, or a later one of the incident). */
    private static OpenIncident learnt(String zone, AlertEvent e) {
        boolean acked = e.kind() == EventKind.ACKNOWLEDGED;
        return new OpenIncident(e.incident(), e.watch(), zone, e.level(), e.quantity(), e.value(), e.unit(),
                e.since() != null ? e.since() : e.at(), e.at() != null ? e.at() : e.since(), e.message(), List.of(),
                e.kind() == EventKind.ESCALATED, acked ? e.by() : null, acked ? e.at() : null, true);
    }

    /** The central zone of a site's event: {@code <site>/<zone>}, or the site's own zone for an alert of no zone. */
    private static String zoneOf(String site, String zone) {
        return zone == null || zone.isEmpty() ? site : CentralSettings.zoneId(site, zone);
    }

    /** Every site's open incidents, oldest first; zones as central zone ids ({@code larkmoor/cow-shed}). */
    public List<OpenAlert> openAlerts() {
        return openIncidents().stream().map(OpenAlert::of).toList();
    }

    /** As {@link #openAlerts()}, with each incident's message (the barn page shows it). */
    public List<OpenIncident> openIncidents() {
        synchronized (conn) {
            return open.values().stream().map(Open::incident).toList();
        }
    }

    /** The site an open incident belongs to, or null. */
    public String siteOf(String incident) {
        synchronized (conn) {
            Open o = open.get(incident);
            return o == null ? null : o.site();
        }
    }

    /** The open incident, or null. */
    public OpenAlert openAlert(String incident) {
        synchronized (conn) {
            Open o = open.get(incident);
            return o == null ? null : OpenAlert.of(o.incident());
        }
    }

    /** The stored events of one site (all sites when null) in the order they arrived. */
    public List<Stored> events(String site) throws SQLException {
        List<Stored> out = new ArrayList<>();
        synchronized (conn) {
            try (PreparedStatement ps = conn.prepareStatement(site == null
                    ? "SELECT seq, site, body FROM site_event ORDER BY seq"
                    : "SELECT seq, site, body FROM site_event WHERE site = ? ORDER BY seq")) {
                if (site != null) ps.setString(1, site);
                try (ResultSet rs = ps.executeQuery()) {
                    while (rs.next()) out.add(new Stored(rs.getLong(1), rs.getString(2), AlertEvent.fromJson(rs.getString(3))));
                }
            }
        }
        return out;
    }

    @Override
    public void close() {
        synchronized (conn) {
            try {
                conn.close();
            } catch (SQLException ignored) {
                // closing: nothing left to do
            }
        }
    }
}
