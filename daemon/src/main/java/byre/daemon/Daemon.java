package byre.daemon;

import byre.config.ByreConfig;
import byre.config.SensorConfig;
import byre.history.HistoryStore;
import byre.history.HistoryWriter;
import byre.history.Retention;
import byre.ingest.IngestStage;
import byre.mqtt.EmbeddedBroker;
import byre.mqtt.MqttLink;
import byre.zones.ZoneDeriver;
import byre.zones.ZoneStage;
import io.micrometer.core.instrument.Counter;
import io.micrometer.core.instrument.Gauge;
import io.micrometer.core.instrument.MeterRegistry;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Clock;
import java.util.ArrayList;
import java.util.List;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;

/**
 * The running daemon: broker link, ingest, zone derivation, history, and (as they are added) rules
 * and alerts, assembled from one configuration. {@link #close()} stops intake first, then drains
 * every stage in order, so a clean stop loses nothing that was acknowledged to the broker.
 */
public final class Daemon implements AutoCloseable {
    private static final Logger LOG = LoggerFactory.getLogger(Daemon.class);
    /** Readings per second one sensor may send before it is throttled (a normal one sends one a minute or so). */
    public static final int FLOOD_LIMIT_PER_SENSOR = 50;

    private final ByreConfig config;
    /** The configuration with the sites a central byre found (its zones and sensors too); the file's otherwise. */
    private volatile ByreConfig running;
    private final Clock clock;
    private final byre.time.Ticker ticker;
    private final MeterRegistry registry;
    private volatile java.time.Duration quietLimit = java.time.Duration.ZERO;
    private EmbeddedBroker broker;
    private HistoryStore store;
    private HistoryWriter writer;
    private Pipeline pipeline;
    private MqttLink link;
    private ZoneStreamPublisher publisher;
    private ZoneStage zones;
    private final List<Pipeline.ZoneListener> extraListeners = new ArrayList<>();
    private java.util.function.Consumer<String> alertConsole;
    private RuleLoader rules;
    private WatchStage watches;
    private byre.notify.AlertService alerts;
    private byre.central.CentralConsumer central;
    private volatile boolean reloadRequested;
    private RuleReload reloads;

    private Daemon(ByreConfig config, Clock clock, byre.time.Ticker ticker, MeterRegistry registry) {
        this.config = config;
        this.running = config;
        this.clock = clock;
        this.ticker = ticker;
        this.registry = registry;
    }

    /** Builds a daemon; {@link #start(ZoneDeriver)} brings it up. */
    /**
     * The history writer's tuning from the configuration. The embedded broker sends at most 10 readings ahead of
     * their acknowledgements, so with it a short pause in arrivals already means the broker is waiting on a commit;
     * mosquitto's window is far larger (the package sets 1000), and the longer pause keeps commits rare there.
     */
    static byre.history.WriterSettings writerSettings(ByreConfig config) {
        var b = byre.history.WriterSettings.builder().commitEvery(config.history().commitEvery());
        if (config.mqtt().embedded()) b.stallPause(java.time.Duration.ofMillis(5));
        return b.build();
    }

    public static Daemon create(ByreConfig config, Clock clock, MeterRegistry registry) {
        return new Daemon(config, clock, byre.time.Ticker.SYSTEM, registry);
    }

    /** As {@link #create(ByreConfig, Clock, MeterRegistry)}, with the ticker that times elapsed time (tests). */
    public static Daemon create(ByreConfig config, Clock clock, byre.time.Ticker ticker, MeterRegistry registry) {
        return new Daemon(config, clock, ticker, registry);
    }

    /** Adds a consumer of zone streams (console lines in the demo, tests); call before start. */
    public Daemon listen(Pipeline.ZoneListener l) {
        extraListeners.add(l);
        return this;
    }

    /** Prints alert transitions to a console as well (the demo); call before start. */
    public Daemon alertsTo(java.util.function.Consumer<String> console) {
        this.alertConsole = console;
        return this;
    }

    /**
     * Starts every stage. Fails with {@link StartException} when the rule files have errors (the
     * diagnostics are logged): a daemon must not start without the alerts the operator wrote.
     */
    public Daemon start(ZoneDeriver deriver) throws Exception {
        try {
            Path db = config.history().path();
            if (db.getParent() != null) Files.createDirectories(db.getParent());
            store = HistoryStore.open(db, clock);
            byre.central.FoundSites found = new byre.central.FoundSites(store);
            // A central byre starts with the sites it found before, their zones and watches included.
            running = found.withStored(config);
            rules = new RuleLoader(running, clock);
            byre.rules.RuleSet ruleSet = rules.load()
                    .orElseThrow(() -> new StartException("the rule files have errors (listed above); run 'byre check'"));
            writer = HistoryWriter.start(store, new Retention(config.history().keepRaw(), config.history().keepMinute(),
                    config.history().keepHour()), clock, writerSettings(config), ticker);
            registerHistoryMeters();

            byre.config.CentralSettings sites = running.central();
            // A central zone takes its site's streams as they are: the barn derived them, the centre derives nothing.
            ZoneDeriver zoneDeriver = byre.central.CentralDeriver.wrap(() -> running.central(), deriver);
            // Zones combine inputs with the max-ages known at start (learnt from the history where not configured).
            zones = new ZoneStage(new ArrayList<>(rules.effective().zones().values()), zoneDeriver, new ZoneMetrics(registry));
            pipeline = new Pipeline(zones, writer, clock, ticker);
            Gauge.builder("byre.pipeline.queue", pipeline, Pipeline::depth).description("Zone readings waiting for the pipeline thread").register(registry);

            var mqtt = config.mqtt();
            if (mqtt.embedded()) {
                // Other clients are accepted once byre has subscribed (on the broker's private port): no reading is
                // acknowledged to a sensor before byre can take it.
                broker = EmbeddedBroker.startGated(mqtt.listenHost(), mqtt.listenPort(), registry);
                mqtt = mqtt.withBroker("embedded", broker.ownPort());
            }
            link = new MqttLink(mqtt, config.site(), registry, ticker);
            // The intervals the rule loader learnt a moment ago: reading the history twice would cost start-up its time again.
            quietLimit = QuietLimit.of(running, ReportingIntervals.byZone(running, rules.intervals()));
            publisher = new ZoneStreamPublisher(link, config.mqtt().publishPrefix(), config.site(), config.mqtt().publishEvery());
            if (sites.enabled()) {
                // The centre does not send the sites' streams back out under its own name.
                ZoneStreamPublisher own = publisher;
                pipeline.addListener(new Pipeline.ZoneListener() {
                    @Override
                    public void accept(byre.rules.ZoneReading r) {
                        if (!isCentralZone(r.zone())) own.accept(r);
                    }

                    @Override
                    public void tick(java.time.Instant now) {
                        own.tick(now);
                    }

                    @Override
                    public java.time.Instant nextTick(java.time.Instant now) {
                        return own.nextTick(now);
                    }
                });
            } else {
                pipeline.addListener(publisher);
            }
            alerts = byre.notify.AlertServices.create(config, store, link, registry, clock);
            if (config.mqtt().acceptAcks()) {
                link.subscribe(alerts.ackTopic(), alerts::onAckMessage);
                String warning = config.mqtt().openAckWarning();
                if (warning != null) LOG.warn("{}", warning);
            }
            AlertStage alertStage = new AlertStage(alerts, link, config.mqtt().publishPrefix(), config.site(), config.timezone(), alertConsole, registry);
            if (config.alerts().digestAt() != null) {
                String last = store.loadState(byre.notify.AlertService.DIGEST_KEY).get(byre.notify.AlertService.DIGEST_KEY);
                alerts.scheduleDigest(config.alerts().digestAt(), config.timezone(), config.alerts().digestNotify(), config.site(),
                        byre.alerts.IdSource.random(), (from, to) -> NightDigestReader.read(store, rules.effective(), from, to, alertStage::episodes),
                        last == null ? null : java.time.Instant.parse(last));
            }
            watches = new WatchStage(ruleSet, store, config.timezone(), alertStage, clock.instant(),
                    config.units() == ByreConfig.DisplayUnits.US);
            pipeline.addListener(watches);
            for (byre.rules.eval.AlertState st : byre.rules.eval.AlertState.values()) {
                if (st == byre.rules.eval.AlertState.CLEAR) continue;
                Gauge.builder("byre.watches", watches, w -> w.openCount(st)).tag("state", st.id())
                        .description("Watch instances by state (clear ones are not counted)").register(registry);
            }
            pipeline.addListener(new SelfWatch(writer, alerts));
            reloads = new RuleReload(rules, watches, () -> {
                boolean asked = reloadRequested;
                reloadRequested = false;
                return asked;
            }, () -> {
                if (writer.stats().healthy()) writer.flush(java.time.Duration.ofSeconds(5));
            });
            pipeline.addListener(reloads);
            io.micrometer.core.instrument.FunctionCounter.builder("byre.rules.reloads", reloads, RuleReload::loaded).tag("result", "loaded")
                    .description("Rule reloads since start").register(registry);
            io.micrometer.core.instrument.FunctionCounter.builder("byre.rules.reloads", reloads, RuleReload::refused).tag("result", "refused")
                    .description("Rule reloads since start").register(registry);
            extraListeners.forEach(pipeline::addListener);

            IngestStage ingest = new IngestStage(running.sensors().values(), clock, ticker, registry, pipeline::offer, FLOOD_LIMIT_PER_SENSOR);
            java.util.Set<String> centralSensors = new java.util.HashSet<>();
            if (sites.enabled()) {
                for (var z : running.zones().values()) if (isCentralZone(z.id())) centralSensors.addAll(z.sensors());
                central = new byre.central.CentralConsumer(running, link, store.openSyncedConnection(), found, clock, registry, pipeline::offer);
                central.onFound(more -> takeIn(more, ingest));
                central.subscribe(ingest);
            }
            for (SensorConfig s : running.sensors().values()) {
                if (!centralSensors.contains(s.id())) link.subscribeAcked(s.topic(), ingest::accept);
            }
            link.onConnect(publisher::republishAll);
            if (broker != null) link.onConnect(broker::open);
            link.onConnecting(ingest::connected);
            pipeline.start();
            if (central != null) central.start();
            alerts.start();
            link.start();
            int foundBefore = running.central().siteIds().size() - config.central().siteIds().size();
            LOG.info("byre started for site {}: {} sensors in {} zones{}, history {}", config.site(), running.sensors().size(),
                    running.zones().size(), foundBefore > 0 ? " (with " + foundBefore + " sites found on the broker before)" : "", db);
            return this;
        } catch (Exception e) {
            close();
            throw e;
        }
    }

    private void registerHistoryMeters() {
        Gauge.builder("byre.history.queue", writer, w -> w.stats().queueDepth()).description("Rows waiting for the history writer").register(registry);
        Gauge.builder("byre.history.backlog", writer, w -> w.stats().backlogRows()).description("Rows held in memory while the database cannot be written").register(registry);
        Gauge.builder("byre.history.rows.written", writer, w -> w.stats().rowsWritten()).description("Rows committed to the history").register(registry);
        Gauge.builder("byre.history.commits", writer, w -> w.stats().batches()).description("History batches committed (one commit each)").register(registry);
        Gauge.builder("byre.history.batch.rows", writer, w -> w.stats().lastBatchRows()).description("Rows in the last committed batch").register(registry);
        Gauge.builder("byre.history.commit.millis", writer, w -> w.stats().lastCommitMillis()).description("Duration of the last commit").register(registry);
        Gauge.builder("byre.history.rows.dropped", writer, w -> w.stats().rowsDropped()).description("Rows dropped because the backlog was full").register(registry);
        Gauge.builder("byre.history.write.errors", writer, w -> w.stats().writeErrors()).description("Failed history writes").register(registry);
        Gauge.builder("byre.history.healthy", writer, w -> w.stats().healthy() ? 1 : 0).description("1 while history writes succeed").register(registry);
        Gauge.builder("byre.history.size.bytes", store, HistoryStore::sizeOnDiskBytes).description("Database size on disk").register(registry);
    }

    /** Asks for the rule files to be read again (SIGHUP); done on the pipeline thread at once. */
    public void reload() {
        reloadRequested = true;
        Pipeline p = pipeline;
        if (p != null) p.wake();
    }

    /** Incidents, outbox and channels; also the acknowledgement service of the admin API. */
    public byre.notify.AlertService alerts() {
        return alerts;
    }

    private boolean isCentralZone(String zone) {
        byre.config.CentralSettings c = running.central();
        return c.isSiteZone(zone) || c.isMirroredZone(zone);
    }

    /**
     * Takes in the sensors and zones of a site a central byre found (on the MQTT callback thread, before the site's
     * first reading) and has the rules compiled again with its zones, on the pipeline thread within a second.
     */
    private void takeIn(ByreConfig more, IngestStage ingest) {
        ByreConfig before = running;
        List<SensorConfig> sensors = more.sensors().values().stream().filter(s -> !before.sensors().containsKey(s.id())).toList();
        List<byre.config.ZoneConfig> zoneList = more.zones().values().stream().filter(z -> !before.zones().containsKey(z.id())).toList();
        ingest.router().add(sensors);
        pipeline.addZones(zoneList);
        running = more;
        rules.use(more);
        reload();
    }

    /**
     * Acknowledges an incident: one of the sites' (central byre) goes to that site's ack topic, any other to this
     * byre's own alerts. The admin API's {@code POST /ack} calls this.
     */
    public byre.alerts.AckResult acknowledge(String incident, String by) {
        byre.central.CentralConsumer c = central;
        byre.alerts.AckResult r = c == null ? null : c.acknowledge(incident, by);
        return r != null ? r : alerts.acknowledge(incident, by);
    }

    /** This byre's open alerts, and on a central byre every site's (zones as {@code <site>/<zone>}). */
    public java.util.List<byre.admin.OpenAlert> openAlerts() {
        java.util.List<byre.admin.OpenAlert> out = new ArrayList<>(alerts.book().openIncidents().stream().map(byre.admin.OpenAlert::of).toList());
        if (central != null) out.addAll(central.openAlerts());
        return out;
    }

    /** The central consumer, or null on a barn's byre. */
    public byre.central.CentralConsumer central() {
        return central;
    }

    public WatchStage watches() {
        return watches;
    }

    /** Rule reloads since start that went live ({@code true}) or were refused for errors ({@code false}). */
    public long ruleReloads(boolean live) {
        RuleReload r = reloads;
        return r == null ? 0 : live ? r.loaded() : r.refused();
    }

    /** A start-up refusal whose message is for the operator. */
    public static final class StartException extends Exception {
        public StartException(String message) {
            super(message);
        }
    }

    public ByreConfig config() {
        return config;
    }

    public MqttLink link() {
        return link;
    }

    public HistoryWriter history() {
        return writer;
    }

    public HistoryStore store() {
        return store;
    }

    public ZoneStage zones() {
        return zones;
    }

    /** Readings that have gone through the pipeline since start. */
    public long processed() {
        return pipeline == null ? 0 : pipeline.processed();
    }

    // ---- hook for the admin API and the watchdog (byre.admin): a read-only snapshot, no side effects ----

    /** The parts' health now; safe to call from any thread, also before start (then everything reads unhealthy). */
    public HealthSnapshot health() {
        MqttLink l = link;
        HistoryWriter w = writer;
        Pipeline p = pipeline;
        return new HealthSnapshot(l != null && l.isConnected(), l == null ? "not started" : l.lastError(),
                w != null && w.stats().healthy(), w == null ? "not started" : w.stats().lastError().orElse(""),
                p == null ? Long.MAX_VALUE : p.idleNanos() / 1_000_000L,
                p == null ? 0 : p.depth(), processed(), w == null ? 0 : w.stats().queueDepth(),
                l == null ? 0 : l.quietWhileConnected().toMillis(), quietLimit.toMillis());
    }

    /** Waits until everything received so far is committed to the history. */
    public boolean flush() {
        long deadline = System.nanoTime() + 10_000_000_000L;
        while (pipeline != null && pipeline.depth() > 0 && System.nanoTime() < deadline) {
            try {
                Thread.sleep(5);
            } catch (InterruptedException e) {
                Thread.currentThread().interrupt();
                return false;
            }
        }
        return writer == null || writer.flush();
    }

    @Override
    public void close() {
        // Stop taking messages, store and acknowledge what was taken, then say goodbye to the broker.
        if (link != null) link.pauseIntake();
        if (pipeline != null) pipeline.close();
        if (writer != null && writer.stats().healthy()) writer.flush(java.time.Duration.ofSeconds(10));
        if (link != null) link.close();
        if (alerts != null) alerts.close();
        if (central != null) central.close();
        if (writer != null) writer.close();
        if (store != null) store.close();
        if (broker != null) broker.close();
        LOG.info("byre stopped");
    }

    /** Zone-stage observations as metrics. */
    private static final class ZoneMetrics implements ZoneStage.Observer {
        private final MeterRegistry registry;
        private final byre.log.RateLimitedLog warnings = new byre.log.RateLimitedLog(LOG, java.time.Duration.ofMinutes(10), System::nanoTime);

        ZoneMetrics(MeterRegistry registry) {
            this.registry = registry;
        }

        @Override
        public void wetBulbAboveDryBulb(String zone, double excessC) {
            Counter.builder("byre.readings.flagged").tag("reason", "wet-above-dry").tag("zone", zone)
                    .description("Readings that are possible but suspicious").register(registry).increment();
            warnings.warn("wet:" + zone, String.format("zone %s: wet bulb reads %.1f C above dry bulb; check the wick and the wiring", zone, excessC));
        }

        @Override
        public void derivationSkipped(String zone, String why) {
            Counter.builder("byre.derivations.skipped").tag("zone", zone).description("Zone derivations skipped for bad inputs")
                    .register(registry).increment();
            warnings.warn("skip:" + zone + why, "zone " + zone + ": " + why);
        }

        @Override
        public void notLive(String zone, String sensorId, String why) {
            Counter.builder("byre.readings.not.live").tag("zone", zone)
                    .description("Readings stored but kept out of live evaluation (repeats, out of order, older than max-age)")
                    .register(registry).increment();
            if (!ZoneStage.REPEAT.equals(why)) warnings.warn("late:" + sensorId, "sensor " + sensorId + ": a reading " + why + " was stored but not evaluated live");
        }

        /** Looked up once per zone: derived() runs for every reading. */
        private final java.util.Map<String, Counter> derivations = new java.util.concurrent.ConcurrentHashMap<>();

        @Override
        public void derived(String zone) {
            derivations.computeIfAbsent(zone, z -> Counter.builder("byre.derivations").tag("zone", z).description("Zone derivations")
                    .register(registry)).increment();
        }
    }

}
