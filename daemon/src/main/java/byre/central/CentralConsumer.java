package byre.central;

import byre.admin.OpenAlert;
import byre.alerts.AckResult;
import byre.alerts.AlertEvent;
import byre.config.ByreConfig;
import byre.config.CentralSettings;
import byre.ingest.IngestStage;
import byre.ingest.Reading;
import byre.json.JsonWriter;
import byre.log.RateLimitedLog;
import byre.mqtt.MqttLink;
import io.micrometer.core.instrument.Counter;
import io.micrometer.core.instrument.MeterRegistry;
import java.nio.charset.StandardCharsets;
import java.sql.Connection;
import java.sql.SQLException;
import java.time.Clock;
import java.time.Duration;
import java.util.List;
import java.util.concurrent.Executors;
import java.util.concurrent.ScheduledExecutorService;
import java.util.concurrent.TimeUnit;
import java.util.function.Consumer;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;

/**
 * byre as the central consumer of other sites (configuration {@code central:}): subscribes each listed site's zone
 * streams (into the ordinary ingest, as the sensors of the central zones), its status and bridge state (the
 * {@code online} streams), its alert events (kept once each in {@link SiteEventLog}) and its retained alert states
 * (which correct the open alerts its events missed, {@link SiteAlertStates}); sends acknowledgements of a site's
 * incidents to that site's ack topic, where the site's byre records them and reports back.
 */
public final class CentralConsumer implements AutoCloseable {
    private static final Logger LOG = LoggerFactory.getLogger(CentralConsumer.class);
    /** The {@code online} streams are sent again this often, so a site that says nothing stays a fresh stream. */
    static final Duration REFRESH_EVERY = Duration.ofSeconds(30);

    /** The configuration with every site found so far; replaced (never changed) when another is found. */
    private volatile ByreConfig config;
    private final String prefix;
    /** {@code <prefix>/}: the start of every site's topics. */
    private final String under;
    private final MqttLink link;
    private final Clock clock;
    private final SiteLinks links;
    private final SiteEventLog events;
    private final SiteAlertStates states;
    private final FoundSites found;
    private final RateLimitedLog warnings = new RateLimitedLog(LOG, Duration.ofMinutes(1), System::nanoTime);
    private final Counter eventsNew;
    private final Counter eventsRepeated;
    private final Counter eventsRejected;
    private final Counter sitesFound;
    private final Counter sitesRefused;
    private volatile Consumer<ByreConfig> onFound = c -> { };
    private IngestStage ingest;
    private ScheduledExecutorService refresher;

    /** {@code eventsConn}: a synced connection to the central history file, owned (and closed) by this consumer. */
    public CentralConsumer(ByreConfig config, MqttLink link, Connection eventsConn, Clock clock, MeterRegistry registry,
                           Consumer<Reading> sink) throws SQLException {
        this(config, link, eventsConn, new FoundSites(null), clock, registry, sink);
    }

    /**
     * @param config the configuration with the sites found before ({@link FoundSites#withStored})
     * @param found  keeps the sites found from now on for the next start
     */
    public CentralConsumer(ByreConfig config, MqttLink link, Connection eventsConn, FoundSites found, Clock clock, MeterRegistry registry,
                           Consumer<Reading> sink) throws SQLException {
        this.config = config;
        this.prefix = config.mqtt().publishPrefix();
        this.under = prefix + "/";
        this.link = link;
        this.clock = clock;
        this.found = found;
        this.links = new SiteLinks(config.central(), prefix, clock, sink);
        this.events = new SiteEventLog(eventsConn, config.history().keepRaw());
        this.states = new SiteAlertStates(under, events, warnings, registry);
        String d = "Sites' alert events received by the centre";
        eventsNew = Counter.builder("byre.central.events").tag("result", "new").description(d).register(registry);
        eventsRepeated = Counter.builder("byre.central.events").tag("result", "repeated").description(d).register(registry);
        eventsRejected = Counter.builder("byre.central.events").tag("result", "rejected").description(d).register(registry);
        String f = "Sites not listed in the configuration that published their status (central.discover)";
        sitesFound = Counter.builder("byre.central.sites.found").tag("result", "joined").description(f).register(registry);
        sitesRefused = Counter.builder("byre.central.sites.found").tag("result", "refused").description(f).register(registry);
    }

    /**
     * Runs, on the MQTT callback thread, each time a site is found (before its first reading goes to ingest): with the
     * configuration that has it, whose new sensors and zones the daemon then takes in.
     */
    public void onFound(Consumer<ByreConfig> listener) {
        this.onFound = listener;
    }

    /**
     * Subscribes the sites' topics (before the link starts); zone streams go to {@code ingest}. Listed sites are
     * subscribed one by one; with {@code discover} every site's topics are, so that an unlisted one is seen.
     */
    public void subscribe(IngestStage ingest) {
        this.ingest = ingest;
        if (config.central().discover()) {
            // One filter per kind for all sites: a listed site's own filters would overlap them (two deliveries).
            link.subscribeAcked(prefix + "/+/zones/#", (topic, payload, retained, ack) -> onZone(siteOf(topic), topic, payload, retained, ack));
            link.subscribe(prefix + "/+/status", this::onStatus);
            link.subscribe(prefix + "/+/uplink", links::accept);
            link.subscribeAcked(prefix + "/+/events", (topic, payload, retained, ack) -> onSiteEvent(siteOf(topic), topic, payload, retained, ack));
            link.subscribe(prefix + "/+/alerts/#", this::onAlertState);
            return;
        }
        for (String site : config.central().siteIds()) {
            link.subscribeAcked(prefix + "/" + site + "/zones/#", (topic, payload, retained, ack) -> onZone(site, topic, payload, retained, ack));
            link.subscribe(links.statusTopic(site), links::accept);
            link.subscribe(links.uplinkTopic(site), links::accept);
            link.subscribeAcked(prefix + "/" + site + "/events", (topic, payload, retained, ack) -> onSiteEvent(site, topic, payload, retained, ack));
            link.subscribe(prefix + "/" + site + "/alerts/#", this::onAlertState);
        }
    }

    /** The site of a topic under the prefix ({@code larkmoor} of {@code byre/larkmoor/zones/…}), or null. */
    private String siteOf(String topic) {
        if (!topic.startsWith(under)) return null;
        int to = topic.indexOf('/', under.length());
        return to > under.length() ? topic.substring(under.length(), to) : null;
    }

    /** A zone stream: a known site's goes to ingest; an unknown site's (not found yet, or this byre's own) is dropped. */
    private void onZone(String site, String topic, byte[] payload, boolean retained, Runnable ack) {
        if (site == null || !config.central().siteIds().contains(site)) {
            if (ack != null) ack.run();
            return;
        }
        links.heard(site, retained);
        ingest.accept(topic, payload, retained, ack);
    }

    private void onSiteEvent(String site, String topic, byte[] payload, boolean retained, Runnable ack) {
        if (site == null || !config.central().siteIds().contains(site)) {
            if (ack != null) ack.run();
            return;
        }
        links.heard(site, retained);
        onEvent(topic, payload, retained, ack);
    }

    /**
     * A site's alert state: a known site's corrects its open alerts; one of a site that may still join (discover) is held
     * until it does, since a bridge may send a site's retained states before its status.
     */
    void onAlertState(String topic, byte[] payload) {
        String site = siteOf(topic);
        if (site == null) return;
        ByreConfig c = config;
        if (c.central().siteIds().contains(site)) {
            states.accept(site, topic, payload);
        } else if (c.central().discover() && CentralSettings.siteIdProblem(site, c.site(), c.zones()) == null) {
            states.hold(site, topic, payload);
        }
    }

    /** A status: a known site's goes to its link; an unknown site that says online or offline is found (discover). */
    void onStatus(String topic, byte[] payload) {
        String site = siteOf(topic);
        if (site == null) return;
        if (!config.central().siteIds().contains(site)) {
            String text = new String(payload, StandardCharsets.UTF_8).strip();
            if (!text.equals("online") && !text.equals("offline")) return; // not a byre's status
            if (!find(site)) return;
        }
        links.accept(topic, payload);
    }

    /** Takes in a site found on the broker; false when it cannot be a site here (logged once a minute, counted). */
    private synchronized boolean find(String site) {
        ByreConfig before = config;
        if (before.central().siteIds().contains(site)) return true;
        if (site.equals(before.site())) return false; // this byre's own status
        String problem = CentralSettings.siteIdProblem(site, before.site(), before.zones());
        String key = "found:" + site;
        if (problem == null && before.central().siteIds().size() - listed() >= CentralSettings.MAX_FOUND_SITES) {
            problem = "this byre has found " + CentralSettings.MAX_FOUND_SITES + " sites already, as many as it takes; list the sites "
                    + "under central.sites or split them across central byres (README, Many sites)";
            key = "found:full";
        }
        if (problem != null) {
            sitesRefused.increment();
            states.refused(site);
            warnings.warn(key, "a status on " + prefix + "/" + clip(site) + "/status was not taken as a new site: " + problem);
            return false;
        }
        CentralSettings.Site s = before.central().found(site);
        ByreConfig after = before.withCentralSites(List.of(s));
        found.remember(site, clock.instant());
        onFound.accept(after); // the daemon takes in its sensors and zones before its first reading arrives
        links.add(site);
        config = after;
        states.joined(site);
        sitesFound.increment();
        LOG.info("site {} found on the broker: zones {}, groups {}, max-age {} (central.defaults)", site,
                s.zones().isEmpty() ? "none" : String.join(", ", s.zones()), s.groups().isEmpty() ? "none" : String.join(", ", s.groups()),
                byre.rules.DurationText.of(s.maxAge()));
        return true;
    }

    /** How many sites the file lists (the rest were found). */
    private int listed() {
        return (int) config.central().sites().values().stream().filter(s -> s.line() > 0).count();
    }

    private static String clip(String s) {
        String one = s.replaceAll("\\p{Cntrl}", "?");
        return one.length() > 40 ? one.substring(0, 40) + "…" : one;
    }

    /** Starts re-sending the {@code online} streams. */
    public void start() {
        refresher = Executors.newSingleThreadScheduledExecutor(r -> {
            Thread t = new Thread(r, "central-links");
            t.setDaemon(true);
            return t;
        });
        long ms = REFRESH_EVERY.toMillis();
        refresher.scheduleAtFixedRate(() -> {
            try {
                links.refresh();
            } catch (RuntimeException e) {
                LOG.error("site link refresh failed: {}", e.toString(), e);
            }
        }, ms, ms, TimeUnit.MILLISECONDS);
    }

    /** One event of a site: kept once by its id, acknowledged to the broker once it is on disk. */
    void onEvent(String topic, byte[] payload, boolean retained, Runnable ack) {
        String[] levels = topic.split("/", -1);
        String site = levels.length >= 2 ? levels[levels.length - 2] : "?";
        String body = new String(payload, StandardCharsets.UTF_8);
        AlertEvent e;
        try {
            e = AlertEvent.fromJson(body);
            if (e.id() == null || e.id().isEmpty()) throw new IllegalArgumentException("it has no id");
        } catch (RuntimeException ex) {
            eventsRejected.increment();
            warnings.warn("event:" + site, "site " + site + ": alert event on " + topic + " ignored: " + ex.getMessage());
            if (ack != null) ack.run();
            return;
        }
        try {
            if (events.record(site, e, body, clock.instant())) {
                eventsNew.increment();
                LOG.info("site {}: {} {} {} ({})", site, e.kind().id(), e.watch(), e.zone(), e.incident());
            } else {
                eventsRepeated.increment();
            }
            if (ack != null) ack.run();
        } catch (SQLException ex) {
            // Not acknowledged: the broker delivers it again (after a reconnect) once the database works.
            warnings.warn("event-db", "site " + site + ": alert event " + e.id() + " not stored (" + ex.getMessage()
                    + "); the broker will deliver it again");
        }
    }

    /**
     * Acknowledges an open incident of a site by publishing {@code {"incident":…,"by":…}} to the site's ack topic;
     * the site records it and its {@code acknowledged} event comes back. Null when no site has that incident open.
     */
    public AckResult acknowledge(String incident, String by) {
        String site = events.siteOf(incident);
        if (site == null) return null;
        OpenAlert open = events.openAlert(incident);
        if (open != null && open.acknowledgedBy() != null) {
            return new AckResult(AckResult.Status.ALREADY, incident, "already acknowledged by " + open.acknowledgedBy() + " at site " + site, List.of());
        }
        String json = new JsonWriter().field("incident", incident).field("by", by).toString();
        if (!link.publishAndWait(prefix + "/" + site + "/ack", json, 10_000)) {
            return new AckResult(AckResult.Status.INVALID, incident, "not sent: the central broker did not take the acknowledgement for site "
                    + site + " (" + link.lastError() + "); try again", List.of());
        }
        return new AckResult(AckResult.Status.ACKNOWLEDGED, incident, "sent to site " + site
                + "; the site records it and reports it back", List.of());
    }

    /** Every site's open incidents. */
    public List<OpenAlert> openAlerts() {
        return events.openAlerts();
    }

    /** The sites as now known: those listed and those found. */
    public CentralSettings settings() {
        return config.central();
    }

    /** The sites' ids: those listed, in the file's order, then those found. */
    public List<String> siteIds() {
        return List.copyOf(config.central().siteIds());
    }

    /** A site's central zones ({@code <site>/<zone>}), in the file's order; none for an unknown site. */
    public List<byre.config.ZoneConfig> zones(String site) {
        ByreConfig c = config;
        CentralSettings.Site s = c.central().sites().get(site);
        if (s == null) return List.of();
        return s.zones().stream().map(z -> c.zones().get(CentralSettings.zoneId(site, z))).filter(java.util.Objects::nonNull).toList();
    }

    public SiteEventLog events() {
        return events;
    }

    public SiteLinks links() {
        return links;
    }

    @Override
    public void close() {
        if (refresher != null) refresher.shutdownNow();
        events.close();
    }
}
