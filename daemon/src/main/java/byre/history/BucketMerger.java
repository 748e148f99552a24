package byre.history;

import java.time.Duration;
import java.time.Instant;
import java.util.function.Consumer;

/**
 * Folds time-ordered raw rows or finer rollups of one stream into wider epoch-aligned buckets. Works because
 * sums, counts, minima and maxima merge exactly; the mean is taken only at the end (sum / count).
 */
final class BucketMerger {

    private final StreamKey key;
    private final Duration every;
    private final long widthMs;
    private final Consumer<RollupRow> sink;

    private long start = Long.MIN_VALUE;
    private long n;
    private double lo;
    private double hi;
    private double total;

    BucketMerger(StreamKey key, Duration every, Consumer<RollupRow> sink) {
        this.key = key;
        this.every = every;
        this.widthMs = every.toMillis();
        this.sink = sink;
    }

    void add(HistoryRow r) {
        merge(r.at().toEpochMilli(), 1, r.value(), r.value(), r.value());
    }

    void add(RollupRow r) {
        merge(r.start().toEpochMilli(), r.count(), r.min(), r.max(), r.mean() * r.count());
    }

    private void merge(long tsMs, long count, double min, double max, double sum) {
        long b = Math.floorDiv(tsMs, widthMs) * widthMs;
        if (n > 0 && b != start) finish();
        if (n == 0) {
            start = b;
            lo = min;
            hi = max;
            total = 0;
        }
        n += count;
        lo = Math.min(lo, min);
        hi = Math.max(hi, max);
        total += sum;
    }

    void finish() {
        if (n == 0) return;
        sink.accept(new RollupRow(key, Instant.ofEpochMilli(start), every, lo, hi, total / n, n));
        n = 0;
    }
}
