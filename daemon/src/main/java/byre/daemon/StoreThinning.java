package byre.daemon;

import byre.units.Quantity;
import java.time.Duration;
import java.time.Instant;
import java.util.HashMap;
import java.util.Map;

/** Decides whether a zone stream's value is due to be stored: at most one row per interval per stream. */
final class StoreThinning {
    private final long intervalMs;
    private final Map<String, long[]> lastStored = new HashMap<>();

    StoreThinning(Duration interval) {
        this.intervalMs = interval.toMillis();
    }

    boolean due(String zone, Quantity quantity, Instant at) {
        long t = at.toEpochMilli();
        long[] last = lastStored.computeIfAbsent(zone, z -> {
            long[] a = new long[Quantity.values().length];
            java.util.Arrays.fill(a, Long.MIN_VALUE);
            return a;
        });
        int q = quantity.ordinal();
        // A time earlier than the last stored one (a clock step back, a redelivery) restarts the interval.
        if (last[q] != Long.MIN_VALUE && t >= last[q] && t - last[q] < intervalMs) return false;
        last[q] = t;
        return true;
    }
}
