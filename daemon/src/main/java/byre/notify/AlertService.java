package byre.notify;

import byre.alerts.AckResult;
import byre.alerts.AckService;
import byre.alerts.AlertEvent;
import byre.alerts.IdSource;
import byre.alerts.IncidentBook;
import byre.alerts.WatchOutcome;
import byre.json.Json;
import java.nio.charset.StandardCharsets;
import java.sql.SQLException;
import java.time.Clock;
import java.time.Duration;
import java.time.Instant;
import java.util.List;
import java.util.Map;
import java.util.Set;
import java.util.function.BiConsumer;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;

/**
 * Alerting as one piece: the incident book decides what to send, the outbox keeps it, the dispatcher delivers
 * it. Every event is committed to the outbox before this returns, in one transaction with the incident state it
 * leaves (so a restart neither repeats nor loses it); a change without events saves the state alone. Build it with
 * {@link AlertServices#create}.
 */
public final class AlertService implements AckService, AutoCloseable {
    private static final Logger LOG = LoggerFactory.getLogger(AlertService.class);
    /** The state key under which the open incidents are kept. */
    public static final String STATE_KEY = "alerts.incidents";

    private final IncidentBook book;
    private final Outbox outbox;
    private final Dispatcher dispatcher;
    private final Map<String, Channel> channels;
    private final BiConsumer<String, String> saveState;
    private final Clock clock;
    private final Duration channelFailingAfter;
    private final String ackTopic;
    private volatile String lastSaved = "";
    /** A channel that gets every event whatever its watch names (the site's event stream), or null. */
    private volatile String everyEventTo;
    private final List<java.util.function.Consumer<AlertEvent>> listeners = new java.util.concurrent.CopyOnWriteArrayList<>();
    private Digest digest;
    private Instant nextDigest;

    /** Where the morning digest goes and how to gather it; {@code source} reads the history for a [from, to) window. */
    private record Digest(java.time.LocalTime at, java.time.ZoneId zone, List<String> channels,
                          java.util.function.BiFunction<Instant, Instant, byre.alerts.NightDigest> source, String site,
                          IdSource ids) {}

    AlertService(IncidentBook book, Outbox outbox, Dispatcher dispatcher, Map<String, Channel> channels,
                 BiConsumer<String, String> saveState, Clock clock, Duration channelFailingAfter, String ackTopic) {
        this.book = book;
        this.outbox = outbox;
        this.dispatcher = dispatcher;
        this.channels = channels;
        this.saveState = saveState;
        this.clock = clock;
        this.channelFailingAfter = channelFailingAfter;
        this.ackTopic = ackTopic;
    }

    public IncidentBook book() {
        return book;
    }

    public Dispatcher dispatcher() {
        return dispatcher;
    }

    public Outbox outbox() {
        return outbox;
    }

    /** Feeds one transition from the rule engine; returns the events it caused, committed to the outbox. */
    public List<AlertEvent> accept(WatchOutcome outcome) {
        List<AlertEvent> events = book.accept(outcome);
        send(events);
        return events;
    }

    /**
     * Turns the morning digest on: at {@code at} (site time zone) the events of the night (from 12 h before) are
     * gathered by {@code source} and sent to {@code channels}. {@code lastSent} (or null) comes from the state
     * key {@link #DIGEST_KEY}, so a restart neither repeats nor skips a digest.
     */
    public void scheduleDigest(java.time.LocalTime at, java.time.ZoneId zone, List<String> channels, String site, IdSource ids,
                               java.util.function.BiFunction<Instant, Instant, byre.alerts.NightDigest> source, Instant lastSent) {
        digest = new Digest(at, zone, List.copyOf(channels), source, site, ids);
        nextDigest = byre.alerts.DigestBuilder.nextRun(lastSent != null ? lastSent : clock.instant(), at, zone);
    }

    /** The state key holding when the last digest went out (ISO instant). */
    public static final String DIGEST_KEY = "alerts.digest.last";

    /** When the next digest is due, or null when none is scheduled. */
    public Instant nextDigest() {
        return nextDigest;
    }

    /** Reminders, escalations, channel self-watch and the digest; call every few seconds from the daemon's tick. */
    public void tick() {
        Instant now = clock.instant();
        List<AlertEvent> due = new java.util.ArrayList<>(book.tick(now));
        if (digest != null && nextDigest != null && !now.isBefore(nextDigest)) {
            try {
                byre.alerts.NightDigest night = digest.source().apply(nextDigest.minus(Duration.ofHours(12)), nextDigest);
                due.add(byre.alerts.DigestBuilder.event(digest.ids().eventId(now), digest.site(), night, digest.zone(), digest.channels()));
            } catch (RuntimeException e) {
                LOG.error("morning digest could not be gathered: {}", e.getMessage());
            }
            try {
                saveState.accept(DIGEST_KEY, nextDigest.toString());
            } catch (RuntimeException e) {
                LOG.error("digest time not saved: {}", e.getMessage());
            }
            nextDigest = byre.alerts.DigestBuilder.nextRun(now, digest.at(), digest.zone());
        }
        Map<String, Instant> failing = dispatcher.failingSince();
        for (String name : channels.keySet()) {
            Instant since = failing.get(name);
            boolean bad = since != null && !now.isBefore(since.plus(channelFailingAfter));
            String msg = bad ? "Channel " + name + " has been failing for " + IncidentBook.human(Duration.between(since, now))
                    + ": " + dispatcher.lastFailure(name) : "Channel " + name + " delivers again";
            due.addAll(book.selfAlert(IncidentBook.CHANNEL_FAILING, name, bad, msg, now, Set.of(name)));
        }
        send(due);
    }

    /** Raises or clears a self-watch alert (e.g. "history-disk"); repeated calls with the same state send nothing. */
    public void selfAlert(String key, boolean active, String message) {
        send(book.selfAlert(key, active, message, clock.instant()));
    }

    @Override
    public AckResult acknowledge(String incidentId, String by) {
        AckResult r = book.acknowledge(incidentId, by, clock.instant());
        send(r.events());
        return r;
    }

    /** The MQTT topic to subscribe for acknowledgements: {@code <prefix>/<site>/ack}. */
    public String ackTopic() {
        return ackTopic;
    }

    /** Handler for the ack topic: payload {"incident":"…","by":"…"}; register with MqttLink.subscribe(ackTopic(), …). */
    public void onAckMessage(String topic, byte[] payload) {
        String text = new String(payload, StandardCharsets.UTF_8);
        try {
            if (Json.parse(text) instanceof Map<?, ?> m && m.get("incident") != null) {
                Object by = m.get("by");
                AckResult r = acknowledge(m.get("incident").toString(), byre.alerts.AckBy.clean(by == null ? null : by.toString(), "mqtt"));
                if (!r.ok()) LOG.warn("ack on {}: {}", topic, r.detail());
                return;
            }
            LOG.warn("ack on {} ignored: payload must be {{\"incident\":\"…\",\"by\":\"…\"}}", topic);
        } catch (RuntimeException e) {
            LOG.warn("ack on {} ignored: not JSON ({})", topic, byre.alerts.AckBy.oneLine(e.getMessage(), 200));
        }
    }

    /** Addresses every later event also to {@code channel} (one of this service's channels). */
    void sendEveryEventTo(String channel) {
        everyEventTo = channel;
    }

    /**
     * Tells {@code listener} every event once it is committed (the log and the demo console show the event's
     * message, the same text the channels get). Called on the thread that made the event; must not block.
     */
    public void onEvent(java.util.function.Consumer<AlertEvent> listener) {
        listeners.add(listener);
    }

    /** From now on messages carry the acknowledgement link of each incident (the barn page's signed links). */
    public void useAckLinks(byre.alerts.AckLinks links) {
        book.setText(book.text().withLinks(links));
    }

    /** Commits events to the outbox with the incident state and wakes the dispatcher; without events, saves the state. */
    void send(List<AlertEvent> events) {
        if (events.isEmpty()) {
            saveState();
            return;
        }
        String all = everyEventTo;
        if (all != null) {
            events = events.stream().map(e -> {
                List<String> to = new java.util.ArrayList<>(e.channels());
                if (!to.contains(all)) to.add(all);
                return e.to(to);
            }).toList();
        }
        try {
            enqueue(events);
        } finally {
            for (AlertEvent e : events) {
                for (java.util.function.Consumer<AlertEvent> l : listeners) {
                    try {
                        l.accept(e);
                    } catch (RuntimeException ex) {
                        LOG.warn("alert listener failed on {}: {}", e.id(), ex.toString());
                    }
                }
            }
        }
    }

    private void enqueue(List<AlertEvent> events) {
        String state = book.snapshot();
        boolean stateChanged = !state.equals(lastSaved);
        try {
            // The state rides in the events' transaction: one commit, not two, before the dispatcher is woken.
            outbox.enqueue(events, clock.instant(), stateChanged ? STATE_KEY : null, state);
            lastSaved = state;
        } catch (SQLException | RuntimeException e) {
            saveState();
            // The outbox is unusable (disk full, read-only): alerting must still work, so try each channel once now.
            LOG.error("alert outbox cannot be written ({}); sending {} event(s) directly without retries", e.getMessage(), events.size());
            for (AlertEvent ev : events) {
                for (String c : ev.channels()) {
                    Channel ch = channels.get(c);
                    if (ch != null) {
                        Thread t = new Thread(() -> LOG.info("direct delivery of {} via {}: {}", ev.id(), c, ch.deliver(ev)), "notify-direct");
                        t.setDaemon(true);
                        t.start();
                    }
                }
            }
        }
        dispatcher.wake();
    }

    private void saveState() {
        String s = book.snapshot();
        if (s.equals(lastSaved)) return;
        try {
            saveState.accept(STATE_KEY, s);
            lastSaved = s;
        } catch (RuntimeException e) {
            LOG.error("alert state not saved ({}); a restart may repeat messages", e.getMessage());
        }
    }

    /** Starts the delivery threads. */
    public void start() {
        dispatcher.start();
    }

    /** One synchronous delivery pass (tests, benchmarks). */
    public void runOnce() {
        dispatcher.runOnce();
    }

    @Override
    public void close() {
        dispatcher.close();
        outbox.close();
    }
}
