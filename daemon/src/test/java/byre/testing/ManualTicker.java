package byre.testing;

import byre.time.Ticker;
import java.time.Duration;
import java.util.concurrent.atomic.AtomicLong;

/** A {@link Ticker} a test moves by hand, beside {@link MutableClock}: elapsed time without waiting. */
public final class ManualTicker implements Ticker {
    private final AtomicLong nanos = new AtomicLong(1_000_000_000L);

    public void advance(Duration d) {
        nanos.addAndGet(d.toNanos());
    }

    @Override
    public long nanos() {
        return nanos.get();
    }
}
