package byre.ingest;

import byre.config.SensorConfig;
import byre.log.RateLimitedLog;
import byre.time.Ticker;
import byre.units.Quantity;
import io.micrometer.core.instrument.Counter;
import io.micrometer.core.instrument.MeterRegistry;
import java.time.Clock;
import java.time.Duration;
import java.time.Instant;
import java.util.Collection;
import java.util.EnumMap;
import java.util.Map;
import java.util.concurrent.ConcurrentHashMap;
import java.util.function.Consumer;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;

/**
 * The first stage of the data flow: topic -> sensor, payload -> number, unit -> canonical,
 * plausibility, the reading's time. Every rejection is counted by reason and logged (rate-limited)
 * with the sensor and the reason; accepted readings go to the sink.
 */
public final class IngestStage {
    /** Earliest believable payload time: a Pi without a real-time clock boots in 1970 or at its build date. */
    static final Instant EARLIEST_BELIEVABLE = Instant.parse("2020-01-01T00:00:00Z");
    /** Payload times further ahead than this are from a sensor whose clock is wrong. */
    static final Duration MAX_AHEAD = Duration.ofMinutes(5);

    /** Readings one sensor may send at once before the flood limit bites. */
    static final int FLOOD_BURST = 1000;
    /** After a (re)connection the broker delivers what it kept for byre's session in one burst: no flood limit then. */
    static final Duration BACKLOG_GRACE = Duration.ofSeconds(30);

    private static final Logger LOG = LoggerFactory.getLogger(IngestStage.class);

    private final TopicRouter router;
    private final Clock clock;
    private final Consumer<Reading> sink;
    private final RateLimitedLog warnings;
    private final FloodGate floodGate;
    private final MeterRegistry registry;
    private final Map<RejectReason, Counter> rejected = new EnumMap<>(RejectReason.class);
    private final Map<String, Counter> receivedBySensor = new ConcurrentHashMap<>();
    private final Map<String, long[]> lastArrivalMs = new ConcurrentHashMap<>();
    private final Counter unknownTopic;
    private final Counter clockBefore2020;
    private final Counter clockAhead;
    private final Counter retainedUntimed;
    private final Ticker ticker;
    private volatile long connectedAtNanos;
    /** Families whose id cap was reached and said so (once each: the refused ids are not kept). */
    private final java.util.Set<String> fullFamiliesLogged = ConcurrentHashMap.newKeySet();

    public IngestStage(Collection<SensorConfig> sensors, Clock clock, MeterRegistry registry, Consumer<Reading> sink,
                       int maxReadingsPerSecondPerSensor) {
        this(sensors, clock, Ticker.SYSTEM, registry, sink, maxReadingsPerSecondPerSensor);
    }

    /** With the {@link Ticker} that times the flood gate and the grace after a connection. */
    public IngestStage(Collection<SensorConfig> sensors, Clock clock, Ticker ticker, MeterRegistry registry, Consumer<Reading> sink,
                       int maxReadingsPerSecondPerSensor) {
        this.router = new TopicRouter(sensors);
        this.clock = clock;
        this.ticker = ticker;
        this.connectedAtNanos = ticker.nanos() - BACKLOG_GRACE.toNanos() - 1;
        this.sink = sink;
        this.registry = registry;
        this.warnings = new RateLimitedLog(LOG, Duration.ofMinutes(1), ticker::nanos);
        this.floodGate = new FloodGate(maxReadingsPerSecondPerSensor, FLOOD_BURST);
        for (RejectReason r : RejectReason.values()) {
            rejected.put(r, Counter.builder("byre.readings.rejected").tag("reason", r.id())
                    .description("Payloads not turned into readings, by reason").register(registry));
        }
        unknownTopic = Counter.builder("byre.readings.unrouted")
                .description("Messages on subscribed topics that no sensor claims").register(registry);
        clockBefore2020 = Counter.builder("byre.readings.time.replaced").tag("reason", "before-2020")
                .description("Payload times not believed; arrival time used instead").register(registry);
        clockAhead = Counter.builder("byre.readings.time.replaced").tag("reason", "ahead")
                .description("Payload times not believed; arrival time used instead").register(registry);
        retainedUntimed = Counter.builder("byre.readings.retained.untimed")
                .description("Retained last values without a payload time, not taken as new readings").register(registry);
    }

    /** Handles one MQTT message; never throws for bad input. Returns the reading or null. */
    public Reading accept(String topic, byte[] payload) {
        return accept(topic, payload, false, null);
    }

    /**
     * Handles one MQTT message whose acknowledgement waits for storage: a reading carries {@code ack} to
     * the history, which runs it once committed; a message that yields no reading is acknowledged at once.
     */
    public Reading accept(String topic, byte[] payload, Runnable ack) {
        return accept(topic, payload, false, ack);
    }

    /**
     * As {@link #accept(String, byte[], Runnable)}; {@code retained}: the broker delivered the message with the
     * retain flag, as the sensor's last known value on byre's subscribing, not as a reading just published. Such a
     * value is taken at its payload time (a redelivery of a stored one is stored once); without a believable
     * payload time its age is unknown, and it is not taken as a new reading at all.
     */
    public Reading accept(String topic, byte[] payload, boolean retained, Runnable ack) {
        Reading r = decode(topic, payload, retained, ack);
        if (r == null && ack != null) ack.run();
        return r;
    }

    private Reading decode(String topic, byte[] payload, boolean retained, Runnable ack) {
        Instant arrival = clock.instant();
        TopicRouter.Route route = router.route(topic);
        if (route == null) {
            unknownTopic.increment();
            warnings.warn("topic:" + topic, "message on " + topic + " matches no configured sensor; ignored");
            return null;
        }
        String id = route.sensorId();
        SensorConfig sensor = route.sensor();
        if (route.overCap()) {
            rejected.get(RejectReason.ID_LIMIT).increment();
            if (fullFamiliesLogged.add(sensor.id())) {
                LOG.warn("sensor family {} ({}) has reached its {} distinct ids (max-ids); readings from new ids such as {}"
                        + " are ignored and counted as rejected (id-limit); raise max-ids if the barn really has more",
                        sensor.id(), sensor.topic(), sensor.maxIds(), id);
            }
            return null;
        }
        long nowNanos = ticker.nanos();
        if (nowNanos - connectedAtNanos > BACKLOG_GRACE.toNanos() && !floodGate.admit(id, nowNanos)) {
            return reject(id, RejectReason.FLOOD, "more than " + floodGate.limitPerSecond() + " readings per second");
        }
        Decoded d = PayloadDecoder.decode(sensor, payload, arrival);
        if (!d.ok()) return reject(id, d.reject(), d.detail());
        Quantity q = sensor.quantity();
        double canonical = d.unit().toCanonical(d.value());
        if (!q.isPlausible(canonical)) {
            return reject(id, RejectReason.OUT_OF_RANGE, String.format("%s %.6g %s is outside %s..%s %s", q.id(), d.value(),
                    d.unit().symbol(), q.plausibleMin(), q.plausibleMax(), q.canonicalUnit().symbol()));
        }
        Instant at = arrival;
        if (d.payloadTime() != null) {
            if (d.payloadTime().isBefore(EARLIEST_BELIEVABLE)) {
                clockBefore2020.increment();
                warnings.warn("clock:" + id, "sensor " + id + " sent time " + d.payloadTime()
                        + ", before 2020: its clock is not set; using the arrival time");
            } else if (d.payloadTime().isAfter(arrival.plus(MAX_AHEAD))) {
                clockAhead.increment();
                warnings.warn("clock:" + id, "sensor " + id + " sent time " + d.payloadTime()
                        + ", more than 5 minutes ahead; using the arrival time");
            } else {
                at = d.payloadTime();
            }
        }
        if (at == arrival && retained) {
            retainedUntimed.increment();
            warnings.warn("retained:" + id, "sensor " + id + ": a retained value without its own time was not taken as a new"
                    + " reading (its age is unknown); give the payload a time or publish without retain");
            return null;
        }
        if (at == arrival) at = distinctArrival(id, arrival);
        receivedBySensor.computeIfAbsent(id, k -> Counter.builder("byre.readings.received").tag("sensor", k)
                .description("Readings accepted, per sensor").register(registry)).increment();
        Reading r = new Reading(id, q, canonical, at, ack);
        sink.accept(r);
        return r;
    }

    private Reading reject(String sensorId, RejectReason reason, String detail) {
        rejected.get(reason).increment();
        warnings.warn(sensorId + ":" + reason.id(), "sensor " + sensorId + ": rejected (" + reason.id() + "): " + detail);
        return null;
    }

    /**
     * A reading stamped with its arrival time gets a time after the sensor's previous one: the history
     * keeps one row per (sensor, millisecond), so two readings arriving in the same millisecond must not
     * collapse into one. (Readings with their own time that collide are a redelivery and are kept once.)
     */
    private Instant distinctArrival(String sensorId, Instant arrival) {
        long ms = arrival.toEpochMilli();
        long[] last = lastArrivalMs.computeIfAbsent(sensorId, k -> new long[] {Long.MIN_VALUE});
        synchronized (last) {
            if (ms <= last[0] && last[0] - ms < 1000) ms = last[0] + 1;
            last[0] = ms;
        }
        return ms == arrival.toEpochMilli() ? arrival : Instant.ofEpochMilli(ms);
    }

    /** Tells the stage that the broker connection was (re)established: a session backlog may follow. */
    public void connected() {
        connectedAtNanos = ticker.nanos();
    }

    public TopicRouter router() {
        return router;
    }
}
