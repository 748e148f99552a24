package byre.ingest;

import java.time.Duration;
import java.util.concurrent.ConcurrentHashMap;
import java.util.function.LongSupplier;
import org.slf4j.Logger;

/**
 * Logs a warning at most once per interval per key, and says how many were held back, so a
 * broken sensor sending garbage ten times a second cannot fill the SD card.
 */
public final class RateLimitedLog {
    private final Logger log;
    private final long intervalNanos;
    private final LongSupplier nanoTime;
    private final ConcurrentHashMap<String, long[]> state = new ConcurrentHashMap<>();

    public RateLimitedLog(Logger log, Duration interval, LongSupplier nanoTime) {
        this.log = log;
        this.intervalNanos = interval.toNanos();
        this.nanoTime = nanoTime;
    }

    /** Warns with {@code message} unless this key was warned about within the interval. */
    public void warn(String key, String message) {
        long now = nanoTime.getAsLong();
        long[] s = state.computeIfAbsent(key, k -> new long[] {now - intervalNanos - 1, 0});
        synchronized (s) {
            if (now - s[0] > intervalNanos) {
                long held = s[1];
                s[0] = now;
                s[1] = 0;
                log.warn(held > 0 ? message + " (" + held + " similar messages held back)" : message);
            } else {
                s[1]++;
            }
        }
    }
}
