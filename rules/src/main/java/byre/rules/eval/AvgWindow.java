package byre.rules.eval;

/** Trailing mean of the readings (not time-weighted) with a running sum. */
final class AvgWindow implements Agg {
    private final long w;
    private final RingDeque d = new RingDeque();
    private double sum;

    AvgWindow(long windowMs) { this.w = windowMs; }

    @Override
    public void push(long t, double v) {
        d.addLast(t, v);
        sum += v;
        evict(t);
    }

    private void evict(long now) {
        long cut = now - w;
        while (!d.isEmpty() && d.firstT() <= cut) {
            sum -= d.firstV();
            d.pollFirst();
        }
        if (d.isEmpty()) sum = 0; // drops rounding drift whenever the window empties
    }

    @Override
    public double value(long now) {
        evict(now);
        return d.isEmpty() ? Double.NaN : sum / d.size();
    }
}
