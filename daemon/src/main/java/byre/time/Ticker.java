package byre.time;

/**
 * Elapsed time in nanoseconds, for the parts that measure how long something took or waited (batch delays,
 * grace periods, rate limits, backoff, "nothing received for"), beside the {@link java.time.Clock} that says
 * what time it is. Injected so that tests move it by hand instead of waiting; {@link #SYSTEM} is
 * {@link System#nanoTime()}. Only differences between two readings mean anything.
 */
@FunctionalInterface
public interface Ticker {
    Ticker SYSTEM = System::nanoTime;

    long nanos();
}
