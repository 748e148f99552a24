package byre.rules.eval;

/** Trailing min or max with a monotonic deque: the deque holds only readings that can still become the extreme. */
final class ExtremeWindow implements Agg {
    private final boolean max;
    private final long w;
    private final RingDeque d = new RingDeque();

    ExtremeWindow(boolean max, long windowMs) {
        this.max = max;
        this.w = windowMs;
    }

    @Override
    public void push(long t, double v) {
        while (!d.isEmpty() && (max ? d.lastV() <= v : d.lastV() >= v)) d.pollLast();
        d.addLast(t, v);
        evict(t);
    }

    private void evict(long now) {
        long cut = now - w;
        while (!d.isEmpty() && d.firstT() <= cut) d.pollFirst();
    }

    @Override
    public double value(long now) {
        evict(now);
        return d.isEmpty() ? Double.NaN : d.firstV();
    }
}
