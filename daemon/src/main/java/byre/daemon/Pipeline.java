package byre.daemon;

import byre.history.HistoryWriter;
import byre.history.StreamKey;
import byre.ingest.Reading;
import byre.rules.ZoneReading;
import byre.zones.ZoneStage;
import java.time.Clock;
import java.time.Duration;
import java.time.Instant;
import java.util.ArrayDeque;
import java.util.ArrayList;
import java.util.List;
import java.util.concurrent.CopyOnWriteArrayList;
import java.util.concurrent.TimeUnit;
import java.util.concurrent.atomic.AtomicLong;
import java.util.concurrent.locks.LockSupport;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;

/**
 * Carries accepted readings through the stages in two steps.
 *
 * <p>On the MQTT callback thread, {@link #offer} stores the raw reading (waiting for room in the history
 * writer's queue, which holds back the broker instead of losing readings) and feeds it to its zone. Readings
 * arrive by the thousand per second in a burst, and a hand-over to another thread for each one costs a
 * context switch that two cores cannot spare.
 *
 * <p>The zone streams derived from them (at most one per zone and second of reading time) go, in the order
 * they were derived, to the pipeline thread, which stores them (thinned), runs the rules and republishes
 * them: that work may wait on SQLite or on the broker, so it must not run on the MQTT client's own thread.
 * That thread also lets the time-driven parts run (pending derivations, hold timers, silence, reminders, rule
 * reloads), each when it is due: every stage says when it next needs a tick ({@link ZoneListener#nextTick}), and
 * the thread sleeps until the earliest of those or the next zone reading. Waking four times a second to find
 * nothing due cost 0.05 CPU seconds a minute (ThreadCpuBench), a sixth of byre's CPU in a barn of 40 sensors.
 */
public final class Pipeline implements AutoCloseable {
    private static final Logger LOG = LoggerFactory.getLogger(Pipeline.class);
    /**
     * Zone streams are stored at most this often: every raw sensor reading is kept, and a zone's
     * derived values can always be recomputed from them; a row a minute per stream keeps the
     * history small on an SD card while rules and MQTT still see every derivation.
     */
    static final java.time.Duration ZONE_STREAM_STORE_EVERY = java.time.Duration.ofMinutes(1);
    /** Zone readings waiting for the pipeline thread at most; then the intake waits. */
    static final int MAX_WAITING = 50_000;
    /**
     * The longest rest with the machine's clock, whatever is due: a deadline is a time on the clock, the rest a span
     * of real time, and a clock set forward meanwhile makes a deadline come sooner. Well below
     * {@link byre.admin.HealthMonitor#STALL_AFTER}, since each turn counts as progress.
     */
    static final long MAX_REST_MILLIS = 10_000;
    /**
     * The longest rest with any other clock: a faster one (the demo's) or one moved by hand (tests') does not keep
     * pace with real time, so deadlines on it are looked at this often, as the thread's ticks always came.
     */
    static final long OTHER_CLOCK_REST_MILLIS = 250;
    /**
     * While readings stream in, the stages are ticked and asked for their next tick at most this often (each turn
     * otherwise: at 200 readings a second the pipeline turns some 400 times a second, and asking every stage each time
     * cost more than the ticks saved).
     */
    static final long TICK_AT_MOST_EVERY_MILLIS = 100;
    /**
     * A derivation put off by a zone's pacing is done by the first turn after it is due, and the thread wakes for it at
     * most this much later: with 50 busy zones, waking for each zone's own due time cost some 35 wake-ups a second.
     */
    static final long DERIVE_SLACK_MILLIS = 250;
    /** In a burst (see {@link BurstGauge}) readings gather this long before the thread takes them. */
    private static final long GATHER_NANOS = TimeUnit.MILLISECONDS.toNanos(2);

    /** A stage that consumes zone streams and may also act on the passing of time. */
    public interface ZoneListener {
        void accept(ZoneReading r);

        /**
         * Acts on the time; called at the earliest {@link #nextTick} of all stages, and with the turns of the readings
         * (at most every {@link #TICK_AT_MOST_EVERY_MILLIS}), so check your own.
         */
        default void tick(Instant now) {}

        /**
         * When this stage next needs {@link #tick} at the latest, as of {@code now} (the time of the pipeline's turn
         * that just ended, after its readings and ticks), or null for never: a stage that acts on time overrides both.
         * A time at or before {@code now} means at once. A stage content with a turn anywhere in a span names its end:
         * the readings' turns may serve it sooner.
         */
        default Instant nextTick(Instant now) {
            return null;
        }
    }

    private final ZoneStage zones;
    private final HistoryWriter history;
    private final Clock clock;
    private final byre.time.Ticker ticker;
    private final List<ZoneListener> listeners = new CopyOnWriteArrayList<>();
    private final Thread thread;
    private final StoreThinning thinning = new StoreThinning(ZONE_STREAM_STORE_EVERY);
    private final AtomicLong processed = new AtomicLong();
    private final long maxRestMillis;
    private volatile long lastProgressNanos;
    private volatile boolean closed;
    /** The pipeline thread's state between turns (only it touches them). */
    private Instant lastTick = Instant.MIN;
    private Instant nextTick = Instant.MIN;
    private final BurstGauge burst = new BurstGauge();
    private final List<ZoneReading> batch = new ArrayList<>();
    /** Turns since the start (tests count them). */
    private long turns;

    /** Guards {@link #zones} and {@link #derived}: one order of derivations for both threads. */
    private final Object lock = new Object();
    /** Zone readings derived but not yet delivered, oldest first. */
    private final ArrayDeque<ZoneReading> derived = new ArrayDeque<>();
    /** The pipeline thread waits for {@link #derived}: only then is a notification needed. */
    private boolean waiting;
    /** Set by {@link #wake()}: the next turn ticks every stage, due or not. */
    private boolean wakeAsked;

    Pipeline(ZoneStage zones, HistoryWriter history, Clock clock) {
        this(zones, history, clock, byre.time.Ticker.SYSTEM);
    }

    /** {@code ticker} times the loop's progress for {@link #idleNanos()}. */
    Pipeline(ZoneStage zones, HistoryWriter history, Clock clock, byre.time.Ticker ticker) {
        this.zones = zones;
        this.history = history;
        this.clock = clock;
        this.ticker = ticker;
        this.lastProgressNanos = ticker.nanos();
        this.maxRestMillis = isMachineClock(clock) ? MAX_REST_MILLIS : OTHER_CLOCK_REST_MILLIS;
        this.thread = new Thread(this::loop, "pipeline");
    }

    /** The system clock in any time zone: the one clock whose time passes with real time. */
    static boolean isMachineClock(Clock clock) {
        return clock.withZone(java.time.ZoneOffset.UTC).equals(Clock.systemUTC());
    }

    /** Takes in zones that came after the start (a central byre's found sites), in step with the readings. */
    void addZones(java.util.Collection<byre.config.ZoneConfig> more) {
        synchronized (lock) {
            zones.add(more);
        }
    }

    void addListener(ZoneListener l) {
        listeners.add(l);
    }

    void start() {
        thread.start();
    }

    /**
     * Has the pipeline thread tick every stage now, due or not: for a request that comes from outside the stages'
     * own deadlines (a SIGHUP asking for a reload, sites found by a central byre).
     */
    void wake() {
        synchronized (lock) {
            wakeAsked = true;
            lock.notifyAll();
        }
    }

    /**
     * Called on the MQTT callback thread. After {@link #close()} the reading is dropped unacknowledged (the
     * broker delivers a QoS 1 message again after the restart).
     */
    void offer(Reading r) {
        if (closed) return;
        history.appendWaiting(StreamKey.sensor(r.sensorId()), r.at().toEpochMilli(), r.value(), r.ack());
        synchronized (lock) {
            // Back-pressure: while the rules and the outbox lag far behind, the intake waits (and so does the broker).
            while (derived.size() >= MAX_WAITING && !closed) {
                try {
                    lock.wait(100);
                } catch (InterruptedException e) {
                    Thread.currentThread().interrupt();
                    break;
                }
            }
            int before = derived.size();
            try {
                zones.accept(r, clock.instant(), derived::addLast);
            } catch (RuntimeException e) {
                LOG.error("zone derivation failed on a reading of {}: {}", r.sensorId(), e.toString(), e);
            }
            if (waiting && derived.size() > before) lock.notifyAll();
        }
        processed.incrementAndGet();
    }

    long processed() {
        return processed.get();
    }

    /** Zone readings derived and waiting for the pipeline thread. */
    int depth() {
        synchronized (lock) {
            return derived.size();
        }
    }

    /** Time since the last loop turn, for the watchdog and /health. */
    long idleNanos() {
        return ticker.nanos() - lastProgressNanos;
    }

    private void loop() {
        while (!closed) {
            try {
                rest();
            } catch (InterruptedException e) {
                break;
            }
            turn();
        }
        // Derived before the stop: still stored and seen by the rules.
        batch.clear();
        synchronized (lock) {
            takeDerived(batch);
        }
        for (ZoneReading zr : batch) deliver(zr);
    }

    /** Waits until a zone reading is waiting, a tick is due or {@link #wake()} was called (or the longest rest passed). */
    private void rest() throws InterruptedException {
        boolean woken = false;
        synchronized (lock) {
            Instant now = clock.instant();
            if (derived.isEmpty() && !wakeAsked && !closed && !tickDue(now)) {
                waiting = true;
                lock.wait(restMillis(now));
                waiting = false;
                woken = !derived.isEmpty();
            }
        }
        // In a burst, let readings gather for a moment: one wake-up per batch, not one per reading.
        if (woken && burst.inBurst()) LockSupport.parkNanos(GATHER_NANOS);
    }

    /** Real milliseconds to rest from {@code now} until the next tick, at least 1 and at most the longest rest. */
    long restMillis(Instant now) {
        if (nextTick == null || !nextTick.isBefore(now.plusMillis(maxRestMillis))) return maxRestMillis;
        if (!nextTick.isAfter(now)) return 1;
        long nanos = Duration.between(now, nextTick).toNanos();
        return Math.max(1, (nanos + 999_999) / 1_000_000);
    }

    /**
     * One turn of the pipeline thread, without waiting: delivers the zone readings waiting, ticks the stages when a tick is
     * due, and asks them when the next one is. Tests call it on their own thread (with the thread not started) to
     * step through time.
     */
    void turn() {
        turns++;
        batch.clear();
        Instant now;
        boolean asked;
        Instant pending;
        synchronized (lock) {
            now = clock.instant();
            asked = wakeAsked;
            wakeAsked = false;
            pending = zones.nextPending();
            if (asked || now.isBefore(lastTick) || (pending != null && !now.isBefore(pending))) {
                try {
                    zones.derivePending(now, derived::addLast);
                } catch (RuntimeException e) {
                    LOG.error("zone derivation failed: {}", e.toString(), e);
                }
                pending = zones.nextPending();
            }
            takeDerived(batch);
        }
        lastProgressNanos = ticker.nanos();
        if (!batch.isEmpty()) burst.batch(System.nanoTime(), batch.size());
        for (ZoneReading zr : batch) deliver(zr);
        // A turn of the readings ticks the stages too, so that what is due soon rides along instead of waking the
        // thread a moment later; in a stream of readings at most every TICK_AT_MOST_EVERY_MILLIS.
        if (asked || tickDue(now) || !now.isBefore(lastTick.plusMillis(TICK_AT_MOST_EVERY_MILLIS))) {
            lastTick = now;
            for (ZoneListener l : listeners) {
                try {
                    l.tick(now);
                } catch (RuntimeException e) {
                    LOG.error("timed stage failed: {}", e.toString(), e);
                }
            }
            nextTick = earliestTick(now, pending == null ? null : pending.plusMillis(DERIVE_SLACK_MILLIS));
        } else if (!batch.isEmpty()) {
            // The readings just delivered may have set a deadline (a hold begun, a value to publish): the stages are
            // asked at the next tick, at most TICK_AT_MOST_EVERY_MILLIS from the last.
            nextTick = earlier(nextTick, lastTick.plusMillis(TICK_AT_MOST_EVERY_MILLIS));
        }
    }

    private static Instant earlier(Instant a, Instant b) {
        return a == null || (b != null && b.isBefore(a)) ? b : a;
    }

    /** The earliest time any stage, or the put-off derivations ({@code pendingBy}), need a tick, as of {@code now}; null for none. */
    private Instant earliestTick(Instant now, Instant pendingBy) {
        Instant next = pendingBy;
        for (ZoneListener l : listeners) {
            try {
                Instant t = l.nextTick(now);
                if (t != null && (next == null || t.isBefore(next))) next = t;
            } catch (RuntimeException e) {
                LOG.error("timed stage failed: {}", e.toString(), e);
                Instant soon = now.plusMillis(OTHER_CLOCK_REST_MILLIS); // as often as ticks always came
                if (next == null || soon.isBefore(next)) next = soon;
            }
        }
        return next;
    }

    /** Due when the earliest tick asked for has come, and at once after the clock stepped back. */
    private boolean tickDue(Instant now) {
        return now.isBefore(lastTick) || (nextTick != null && !now.isBefore(nextTick));
    }

    /** When the next tick is due (null: none asked for); for tests that step through time with {@link #turn()}. */
    Instant nextTick() {
        return nextTick;
    }

    /** Turns taken so far; for tests. */
    long turns() {
        return turns;
    }

    /** Moves every waiting zone reading into {@code into} (holding {@link #lock}); frees an intake held back. */
    private void takeDerived(List<ZoneReading> into) {
        if (derived.size() >= MAX_WAITING) lock.notifyAll();
        into.addAll(derived);
        derived.clear();
    }

    private void deliver(ZoneReading zr) {
        if (thinning.due(zr.zone(), zr.quantity(), zr.at())) {
            history.append(StreamKey.zone(zr.zone(), zr.quantity()), zr.at(), zr.value());
        }
        for (ZoneListener l : listeners) {
            try {
                l.accept(zr);
            } catch (RuntimeException e) {
                LOG.error("zone stage listener failed on {} {}: {}", zr.zone(), zr.quantity(), e.toString(), e);
            }
        }
    }

    /** Stops taking readings, delivers what was derived, then stops the thread. */
    @Override
    public void close() {
        closed = true;
        synchronized (lock) {
            lock.notifyAll();
        }
        try {
            thread.join(10_000);
        } catch (InterruptedException e) {
            Thread.currentThread().interrupt();
        }
    }
}
