package byre.rules.eval;

/**
 * Change over the window: the latest reading minus the reading in force at the window's start
 * (the newest one at or before now - w). Unknown until the stream has that much history.
 */
final class RiseWindow implements Agg {
    private final long w;
    private final RingDeque d = new RingDeque();
    private boolean hasBase;
    private double base;
    private double last = Double.NaN;

    RiseWindow(long windowMs) { this.w = windowMs; }

    @Override
    public void push(long t, double v) {
        d.addLast(t, v);
        last = v;
        evict(t);
    }

    private void evict(long now) {
        long cut = now - w;
        while (!d.isEmpty() && d.firstT() <= cut) {
            base = d.firstV();
            hasBase = true;
            d.pollFirst();
        }
    }

    @Override
    public double value(long now) {
        evict(now);
        return hasBase ? last - base : Double.NaN;
    }
}
