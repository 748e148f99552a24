package byre.demo;

import java.time.Clock;
import java.time.Duration;
import java.time.Instant;
import java.time.ZoneId;
import java.time.ZoneOffset;

/**
 * Simulated time running {@code speed} times faster than the machine's monotonic clock, from a
 * simulated origin. The feed publisher paces itself by it; the demo can hand the same clock to the
 * daemon so that hold times ("for 30m") pass in simulated time.
 */
public final class SimClock extends Clock {
    private final Instant simOrigin;
    private final long realOriginNanos;
    private final double speed;
    private final ZoneId zone;

    /** Starts now: {@link #instant()} is {@code simOrigin} at this moment. */
    public SimClock(Instant simOrigin, double speed) {
        this(simOrigin, System.nanoTime(), speed, ZoneOffset.UTC);
    }

    private SimClock(Instant simOrigin, long realOriginNanos, double speed, ZoneId zone) {
        if (!(speed > 0) || Double.isInfinite(speed)) {
            throw new IllegalArgumentException("speed must be a positive number, got " + speed);
        }
        this.simOrigin = simOrigin;
        this.realOriginNanos = realOriginNanos;
        this.speed = speed;
        this.zone = zone;
    }

    public double speed() { return speed; }

    public Instant simOrigin() { return simOrigin; }

    @Override
    public Instant instant() {
        long realElapsed = System.nanoTime() - realOriginNanos;
        return simOrigin.plusNanos((long) (realElapsed * speed));
    }

    /** Real nanoseconds from now until simulated instant {@code t} (negative when it has passed). */
    public long nanosUntil(Instant t) {
        double simNanos = Duration.between(simOrigin, t).toNanos();
        long due = realOriginNanos + (long) (simNanos / speed);
        return due - System.nanoTime();
    }

    @Override
    public ZoneId getZone() { return zone; }

    @Override
    public Clock withZone(ZoneId z) { return new SimClock(simOrigin, realOriginNanos, speed, z); }
}
