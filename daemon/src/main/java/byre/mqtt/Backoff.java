package byre.mqtt;

import byre.time.Ticker;
import java.time.Duration;

/**
 * When to try connecting again: {@code first} after a failed attempt, doubling up to {@code max}, and back to
 * {@code first} once connected. The cap bounds how long byre stays away after the broker is back: at most
 * {@code max} plus one attempt. Elapsed time comes from a {@link Ticker}, so the schedule is tested without waiting.
 */
final class Backoff {
    private final Ticker ticker;
    private final long firstNanos;
    private final long maxNanos;
    private long delayNanos;
    private long dueNanos;

    Backoff(Ticker ticker, Duration first, Duration max) {
        this.ticker = ticker;
        this.firstNanos = first.toNanos();
        this.maxNanos = max.toNanos();
        this.delayNanos = firstNanos;
        this.dueNanos = ticker.nanos();
    }

    /** An attempt failed: the next one is due one delay from now, and the delay after it doubles (up to the cap). */
    void failed() {
        dueNanos = ticker.nanos() + delayNanos;
        delayNanos = Math.min(maxNanos, delayNanos * 2);
    }

    /** Connected: the next loss is retried after the first, short delay. */
    void connected() {
        delayNanos = firstNanos;
    }

    /** Nanoseconds until the next attempt is due; 0 when it is due. */
    long waitNanos() {
        return Math.max(0, dueNanos - ticker.nanos());
    }
}
