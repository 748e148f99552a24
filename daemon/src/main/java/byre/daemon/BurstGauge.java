package byre.daemon;

import java.util.concurrent.TimeUnit;

/**
 * Tells the pipeline thread whether zone readings come in a burst (a replay, a broker handing over its backlog after a
 * restart) or at a barn's live rate. In a burst it lets readings gather for a moment, one wake-up per batch instead of
 * one per reading; at a live rate it takes each batch at once, since there a nap saves next to nothing and is added to
 * every alert's latency. Judged by the moving average (over about 8 batches) of the time per zone reading: a batch's
 * gap after the one before divided by its size, which gathering does not change (a longer gap, a bigger batch).
 */
final class BurstGauge {
    /**
     * Zone readings closer than this on average are a burst: more than 2,000 a second. 200 sensors at a reading a
     * second each (the highest rate byre is built for) make a few hundred, and below about 450 batches a second (a
     * 2 ms nap and a little work each) a nap saves no wake-up at all.
     */
    static final long BURST_NANOS_PER_READING = TimeUnit.MICROSECONDS.toNanos(500);
    /** Longer gaps count as this much, so that one pause does not take many batches to forget. */
    private static final long MAX_GAP_NANOS = TimeUnit.SECONDS.toNanos(1);

    private long lastNanos;
    private boolean seen;
    private long averageNanosPerReading = MAX_GAP_NANOS;

    /** A batch of {@code readings} (at least 1) was taken at {@code nowNanos} (a monotonic clock). */
    void batch(long nowNanos, int readings) {
        if (seen) {
            long perReading = Math.min(nowNanos - lastNanos, MAX_GAP_NANOS) / Math.max(1, readings);
            averageNanosPerReading += (perReading - averageNanosPerReading) / 8;
        }
        seen = true;
        lastNanos = nowNanos;
    }

    boolean inBurst() {
        return averageNanosPerReading < BURST_NANOS_PER_READING;
    }
}
