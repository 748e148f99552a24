package byre.daemon;

import byre.history.HistoryWriter;
import byre.history.StreamKey;
import byre.ingest.Reading;
import byre.rules.ZoneReading;
import byre.zones.ZoneStage;
import java.time.Clock;
import java.time.Instant;
import java.util.List;
import java.util.concurrent.ArrayBlockingQueue;
import java.util.concurrent.BlockingQueue;
import java.util.concurrent.CopyOnWriteArrayList;
import java.util.concurrent.TimeUnit;
import java.util.concurrent.atomic.AtomicLong;
import java.util.function.Consumer;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;

/**
 * The one thread that carries accepted readings through the stages: history (raw), zone derivation,
 * history (zone streams), rules, MQTT republishing. Readings are handed over from the MQTT callback
 * through a bounded queue; a full queue blocks the callback, which holds back the broker (QoS 1
 * back-pressure) instead of losing readings. Once a second it also lets the time-driven parts run.
 */
public final class Pipeline implements AutoCloseable {
    private static final Logger LOG = LoggerFactory.getLogger(Pipeline.class);
    /**
     * Zone streams are stored at most this often: every raw sensor reading is kept, and a zone's
     * derived values can always be recomputed from them; a row a minute per stream keeps the
     * history small on an SD card while rules and MQTT still see every derivation.
     */
    /** Readings taken from the queue per turn at most. */
    static final int BATCH = 512;
    static final java.time.Duration ZONE_STREAM_STORE_EVERY = java.time.Duration.ofMinutes(1);
    private static final Reading STOP = new Reading("", byre.units.Quantity.DRY_BULB, 0, Instant.EPOCH);

    /** A stage that consumes zone streams and may also act on the passing of time. */
    public interface ZoneListener {
        void accept(ZoneReading r);

        default void tick(Instant now) {}
    }

    private final BlockingQueue<Reading> queue;
    private final ZoneStage zones;
    private final HistoryWriter history;
    private final Clock clock;
    private final List<ZoneListener> listeners = new CopyOnWriteArrayList<>();
    private final Thread thread;
    private final StoreThinning thinning = new StoreThinning(ZONE_STREAM_STORE_EVERY);
    private final AtomicLong processed = new AtomicLong();
    private volatile long lastProgressNanos = System.nanoTime();

    Pipeline(int capacity, ZoneStage zones, HistoryWriter history, Clock clock) {
        this.queue = new ArrayBlockingQueue<>(capacity);
        this.zones = zones;
        this.history = history;
        this.clock = clock;
        this.thread = new Thread(this::loop, "pipeline");
    }

    void addListener(ZoneListener l) {
        listeners.add(l);
    }

    void start() {
        thread.start();
    }

    /** Called on the MQTT callback thread; waits while the queue is full. */
    void offer(Reading r) {
        try {
            queue.put(r);
        } catch (InterruptedException e) {
            Thread.currentThread().interrupt();
        }
    }

    long processed() {
        return processed.get();
    }

    int depth() {
        return queue.size();
    }

    /** Nanos (System.nanoTime) of the last loop turn, for the watchdog and /health. */
    long lastProgressNanos() {
        return lastProgressNanos;
    }

    private void loop() {
        Instant lastTick = Instant.MIN;
        Consumer<ZoneReading> fanOut = zr -> {
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
        };
        java.util.ArrayList<Reading> batch = new java.util.ArrayList<>(BATCH);
        boolean stopping = false;
        while (!stopping) {
            Reading r;
            try {
                r = queue.poll(250, TimeUnit.MILLISECONDS);
            } catch (InterruptedException e) {
                break;
            }
            lastProgressNanos = System.nanoTime();
            batch.clear();
            if (r != null) {
                batch.add(r);
                // Take what else is waiting in one go: one wake-up per burst, not per reading.
                queue.drainTo(batch, BATCH - 1);
            }
            for (Reading b : batch) {
                if (b == STOP) {
                    stopping = true;
                    break;
                }
                history.append(StreamKey.sensor(b.sensorId()), b.at().toEpochMilli(), b.value(), b.ack());
                try {
                    zones.accept(b, fanOut);
                } catch (RuntimeException e) {
                    LOG.error("zone derivation failed on a reading of {}: {}", b.sensorId(), e.toString(), e);
                }
                processed.incrementAndGet();
            }
            if (stopping) break;
            Instant now = clock.instant();
            if (r == null || now.isBefore(lastTick) || !now.isBefore(lastTick.plusMillis(1000))) {
                lastTick = now;
                try {
                    zones.derivePending(now, fanOut);
                } catch (RuntimeException e) {
                    LOG.error("zone derivation failed: {}", e.toString(), e);
                }
                for (ZoneListener l : listeners) {
                    try {
                        l.tick(now);
                    } catch (RuntimeException e) {
                        LOG.error("timed stage failed: {}", e.toString(), e);
                    }
                }
            }
        }
    }

    /** Drains what is queued, then stops the thread. */
    @Override
    public void close() {
        try {
            queue.put(STOP);
            thread.join(10_000);
        } catch (InterruptedException e) {
            Thread.currentThread().interrupt();
        }
    }
}
