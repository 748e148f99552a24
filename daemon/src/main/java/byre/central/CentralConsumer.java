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
 * {@code online} streams) and its alert events (kept once each in {@link SiteEventLog}); sends acknowledgements of a
 * site's incidents to that site's ack topic, where the site's byre records them and reports back.
 */
public final class CentralConsumer implements AutoCloseable {
    private static final Logger LOG = LoggerFactory.getLogger(CentralConsumer.class);
    /** The {@code online} streams are sent again this often, so a site that says nothing stays a fresh stream. */
    static final Duration REFRESH_EVERY = Duration.ofSeconds(30);

    private final CentralSettings central;
    private final java.util.Map<String, byre.config.ZoneConfig> zones;
    private final String prefix;
    private final MqttLink link;
    private final Clock clock;
    private final SiteLinks links;
    private final SiteEventLog events;
    private final RateLimitedLog warnings = new RateLimitedLog(LOG, Duration.ofMinutes(1), System::nanoTime);
    private final Counter eventsNew;
    private final Counter eventsRepeated;
    private final Counter eventsRejected;
    private ScheduledExecutorService refresher;

    /** {@code eventsConn}: a synced connection to the central history file, owned (and closed) by this consumer. */
    public CentralConsumer(ByreConfig config, MqttLink link, Connection eventsConn, Clock clock, MeterRegistry registry,
                           Consumer<Reading> sink) throws SQLException {
        this.central = config.central();
        this.zones = config.zones();
        this.prefix = config.mqtt().publishPrefix();
        this.link = link;
        this.clock = clock;
        this.links = new SiteLinks(central, prefix, clock, sink);
        this.events = new SiteEventLog(eventsConn);
        String d = "Sites' alert events received by the centre";
        eventsNew = Counter.builder("byre.central.events").tag("result", "new").description(d).register(registry);
        eventsRepeated = Counter.builder("byre.central.events").tag("result", "repeated").description(d).register(registry);
        eventsRejected = Counter.builder("byre.central.events").tag("result", "rejected").description(d).register(registry);
    }

    /** Subscribes every listed site's topics (before the link starts); zone streams go to {@code ingest}. */
    public void subscribe(IngestStage ingest) {
        for (String site : central.siteIds()) {
            link.subscribeAcked(prefix + "/" + site + "/zones/#", (topic, payload, retained, ack) -> {
                links.heard(site, retained);
                ingest.accept(topic, payload, retained, ack);
            });
            link.subscribe(links.statusTopic(site), links::accept);
            link.subscribe(links.uplinkTopic(site), links::accept);
            link.subscribeAcked(prefix + "/" + site + "/events", (topic, payload, retained, ack) -> {
                links.heard(site, retained);
                onEvent(topic, payload, retained, ack);
            });
        }
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

    /** The sites' ids, in the file's order. */
    public List<String> siteIds() {
        return List.copyOf(central.siteIds());
    }

    /** A site's central zones ({@code <site>/<zone>}), in the file's order; none for an unknown site. */
    public List<byre.config.ZoneConfig> zones(String site) {
        CentralSettings.Site s = central.sites().get(site);
        if (s == null) return List.of();
        return s.zones().stream().map(z -> zones.get(CentralSettings.zoneId(site, z))).filter(java.util.Objects::nonNull).toList();
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
