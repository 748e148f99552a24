package byre.ingest;

import java.util.concurrent.ConcurrentHashMap;

/**
 * A token bucket per sensor: a sensor gone mad (firmware loop, bad retained-message storm) is
 * throttled so that it cannot starve the others. A normal sensor reports every few seconds.
 */
final class FloodGate {
    private final int limitPerSecond;
    private final double burst;
    private final ConcurrentHashMap<String, Bucket> buckets = new ConcurrentHashMap<>();

    private static final class Bucket {
        double tokens;
        long lastNanos;

        Bucket(double tokens, long lastNanos) {
            this.tokens = tokens;
            this.lastNanos = lastNanos;
        }
    }

    /** A sensor may send {@code burst} readings at once, then {@code limitPerSecond} on average. */
    FloodGate(int limitPerSecond, int burst) {
        this.limitPerSecond = limitPerSecond;
        this.burst = Math.max(burst, limitPerSecond);
    }

    int limitPerSecond() {
        return limitPerSecond;
    }

    boolean admit(String sensorId, long nowNanos) {
        if (limitPerSecond <= 0) return true;
        Bucket b = buckets.computeIfAbsent(sensorId, k -> new Bucket(burst, nowNanos));
        synchronized (b) {
            double elapsedS = (nowNanos - b.lastNanos) / 1e9;
            b.lastNanos = nowNanos;
            b.tokens = Math.min(burst, b.tokens + elapsedS * limitPerSecond);
            if (b.tokens >= 1) {
                b.tokens -= 1;
                return true;
            }
            return false;
        }
    }
}
