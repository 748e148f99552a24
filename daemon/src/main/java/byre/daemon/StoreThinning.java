package byre.daemon;

import byre.history.StreamKey;
import java.time.Duration;
import java.time.Instant;
import java.util.HashMap;
import java.util.Map;

/** Decides whether a stream's value is due to be stored: at most one row per interval per stream. */
final class StoreThinning {
    private final long intervalMs;
    private final Map<StreamKey, Long> lastStored = new HashMap<>();

    StoreThinning(Duration interval) {
        this.intervalMs = interval.toMillis();
    }

    boolean due(StreamKey key, Instant at) {
        long t = at.toEpochMilli();
        Long last = lastStored.get(key);
        // A time earlier than the last stored one (a clock step back, a redelivery) restarts the interval.
        if (last != null && t >= last && t - last < intervalMs) return false;
        lastStored.put(key, t);
        return true;
    }
}
