package byre.history;

import java.time.Duration;

/** The two stored rollup levels. Buckets are aligned to the Unix epoch (UTC). */
public enum Resolution {
    MINUTE("rollup_minute", 60_000L),
    HOUR("rollup_hour", 3_600_000L);

    final String table;
    final long widthMs;

    Resolution(String table, long widthMs) {
        this.table = table;
        this.widthMs = widthMs;
    }

    public Duration width() { return Duration.ofMillis(widthMs); }

    long bucketStart(long tsMs) { return Math.floorDiv(tsMs, widthMs) * widthMs; }
}
