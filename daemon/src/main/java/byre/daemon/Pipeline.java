package byre.daemon;

import byre.history.HistoryWriter;
import byre.history.StreamKey;
import byre.ingest.Reading;
import byre.rules.ZoneReading;
import byre.zones.ZoneStage;
import java.time.Clock;
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
 * Four times a second that thread also lets the time-driven parts run (pending derivations, hold timers,
 * silence, rule reloads).
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
    /** The time-driven parts run this often. */
    private static final long TICK_MILLIS = 250;
    /** In a burst (see {@link BurstGauge}) readings gather this long before the thread takes them. */
    private static final long GATHER_NANOS = TimeUnit.MILLISECONDS.toNanos(2);

    /** A stage that consumes zone streams and may also act on the passing of time. */
    public interface ZoneListener {
        void accept(ZoneReading r);

        default void tick(Instant now) {}
    }

    private final ZoneStage zones;
    private final HistoryWriter history;
    private final Clock clock;
    private final byre.time.Ticker ticker;
    private final List<ZoneListener> listeners = new CopyOnWriteArrayList<>();
    private final Thread thread;
    private final StoreThinning thinning = new StoreThinning(ZONE_STREAM_STORE_EVERY);
    private final AtomicLong processed = new AtomicLong();
    private volatile long lastProgressNanos;
    private volatile boolean closed;

    /** Guards {@link #zones} and {@link #derived}: one order of derivations for both threads. */
    private final Object lock = new Object();
    /** Zone readings derived but not yet delivered, oldest first. */
    private final ArrayDeque<ZoneReading> derived = new ArrayDeque<>();
    /** The pipeline thread waits for {@link #derived}: only then is a notification needed. */
    private boolean waiting;

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
        this.thread = new Thread(this::loop, "pipeline");
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
        Instant lastTick = Instant.MIN;
        BurstGauge burst = new BurstGauge();
        List<ZoneReading> batch = new ArrayList<>();
        while (!closed) {
            batch.clear();
            Instant now = clock.instant();
            boolean tickDue = tickDue(now, lastTick);
            try {
                boolean woken = false;
                synchronized (lock) {
                    if (derived.isEmpty() && !tickDue) {
                        waiting = true;
                        lock.wait(TICK_MILLIS);
                        waiting = false;
                        woken = !derived.isEmpty();
                    }
                }
                // In a burst, let readings gather for a moment: one wake-up per batch, not one per reading.
                if (woken && burst.inBurst()) LockSupport.parkNanos(GATHER_NANOS);
                synchronized (lock) {
                    now = clock.instant();
                    tickDue = tickDue(now, lastTick);
                    if (tickDue) {
                        try {
                            zones.derivePending(now, derived::addLast);
                        } catch (RuntimeException e) {
                            LOG.error("zone derivation failed: {}", e.toString(), e);
                        }
                    }
                    takeDerived(batch);
                }
            } catch (InterruptedException e) {
                break;
            }
            lastProgressNanos = ticker.nanos();
            if (!batch.isEmpty()) burst.batch(System.nanoTime(), batch.size());
            for (ZoneReading zr : batch) deliver(zr);
            if (tickDue) {
                lastTick = now;
                for (ZoneListener l : listeners) {
                    try {
                        l.tick(now);
                    } catch (RuntimeException e) {
                        LOG.error("timed stage failed: {}", e.toString(), e);
                    }
                }
            }
        }
        // Derived before the stop: still stored and seen by the rules.
        batch.clear();
        synchronized (lock) {
            takeDerived(batch);
        }
        for (ZoneReading zr : batch) deliver(zr);
    }

    /** Due at the interval, and at once after the clock stepped back. */
    private static boolean tickDue(Instant now, Instant lastTick) {
        return now.isBefore(lastTick) || !now.isBefore(lastTick.plusMillis(TICK_MILLIS));
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
