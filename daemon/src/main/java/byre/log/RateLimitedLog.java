package byre.log;

import java.time.Duration;
import java.util.concurrent.ConcurrentHashMap;
import java.util.function.LongSupplier;
import org.slf4j.Logger;

/**
 * Logs a warning at most once per interval per key, and says how many were held back, so a
 * broken sensor sending garbage ten times a second cannot fill the SD card. At most {@link #MAX_KEYS} keys
 * are remembered (keys can come from topics a device invents); further keys share one, so they are
 * still logged, at most once per interval together.
 */
public final class RateLimitedLog {
    static final int MAX_KEYS = 1024;
    static final String OVERFLOW_KEY = "(other keys)";

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
        if (state.size() >= MAX_KEYS && !state.containsKey(key)) key = OVERFLOW_KEY;
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

    /** Keys remembered (bounded by {@link #MAX_KEYS} plus the shared one). */
    int keys() {
        return state.size();
    }
}
