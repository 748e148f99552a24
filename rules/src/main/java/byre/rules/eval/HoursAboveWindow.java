package byre.rules.eval;

/**
 * Hours within the trailing window during which the stream was strictly above a threshold. Each reading
 * holds until the next one, but never longer than the freshness limit (a gap counts as not above).
 * Above-intervals are coalesced in a deque with a running total.
 */
final class HoursAboveWindow implements Agg {
    private final double threshold;
    private final long w;
    private final long cap;
    private final RingDeque spans = new RingDeque(); // (start, end as double)
    private double totalMs;
    private long lastT = Long.MIN_VALUE;
    private boolean lastAbove;

    HoursAboveWindow(double threshold, long windowMs, long maxAgeMs) {
        this.threshold = threshold;
        this.w = windowMs;
        this.cap = maxAgeMs;
    }

    @Override
    public void push(long t, double v) {
        if (lastT != Long.MIN_VALUE && lastAbove) {
            long end = Math.min(t, lastT + cap);
            if (end > lastT) add(lastT, end);
        }
        lastT = t;
        lastAbove = v > threshold;
        evict(t);
    }

    private void add(long s, long e) {
        if (!spans.isEmpty() && (long) spans.lastV() == s) {
            long start = spans.lastT(); // contiguous with the last span: extend it
            spans.pollLast();
            spans.addLast(start, e);
        } else {
            spans.addLast(s, e);
        }
        totalMs += e - s;
    }

    private void evict(long now) {
        long cut = now - w;
        while (!spans.isEmpty() && (long) spans.firstV() <= cut) {
            totalMs -= (long) spans.firstV() - spans.firstT();
            spans.pollFirst();
        }
        if (spans.isEmpty()) totalMs = 0;
    }

    @Override
    public double value(long now) {
        evict(now);
        long cut = now - w;
        double ms = totalMs;
        if (!spans.isEmpty() && spans.firstT() < cut) ms -= cut - spans.firstT();
        if (lastT != Long.MIN_VALUE && lastAbove) {
            long s = Math.max(lastT, cut);
            long e = Math.min(now, lastT + cap);
            if (e > s) ms += e - s;
        }
        if (lastT == Long.MIN_VALUE) return Double.NaN;
        return ms / 3_600_000.0;
    }
}
