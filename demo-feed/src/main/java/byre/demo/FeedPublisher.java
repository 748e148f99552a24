package byre.demo;

import java.io.IOException;
import java.time.Clock;
import java.time.Duration;
import java.time.Instant;
import java.util.List;
import java.util.Optional;
import java.util.concurrent.CountDownLatch;
import java.util.concurrent.TimeUnit;
import java.util.concurrent.atomic.AtomicLong;

/**
 * Sends a {@link FeedSource}'s messages to a {@link FeedSink}, pacing simulated time at
 * {@code speed} times real time (speed 60: one simulated minute per real second). Runs on one
 * daemon thread; {@link #stop()} wakes it, waits for it and closes the sink, so nothing is left
 * running afterwards.
 *
 * <pre>
 * FeedPublisher p = FeedPublisher.toBroker("tcp://127.0.0.1:1883", 1, 60);
 * p.start(new LarkmoorFarm(1), Duration.ofHours(24));   // null duration: run until stopped
 * Clock simulated = p.clock();                            // for the daemon under demo
 * ...
 * p.stop();
 * </pre>
 */
public final class FeedPublisher implements AutoCloseable {
    private static final long STOP_JOIN_MS = 5_000;

    private final FeedSink sink;
    private final double speed;
    private final AtomicLong published = new AtomicLong();
    private final CountDownLatch stopRequested = new CountDownLatch(1);
    private final CountDownLatch finished = new CountDownLatch(1);
    private volatile Thread worker;
    private volatile SimClock clock;
    private volatile Throwable failure;
    private boolean sinkClosed;

    /** @param speed simulated seconds per real second; {@code Double.POSITIVE_INFINITY} publishes flat out */
    public FeedPublisher(FeedSink sink, double speed) {
        if (sink == null) throw new IllegalArgumentException("no sink to publish to");
        if (!(speed > 0)) throw new IllegalArgumentException("speed must be a positive number, got " + speed);
        this.sink = sink;
        this.speed = speed;
    }

    /** Connects to {@code brokerUri} (Paho, unique client id, in-memory persistence). */
    public static FeedPublisher toBroker(String brokerUri, int qos, double speed) throws IOException {
        return new FeedPublisher(new PahoSink(brokerUri, "byre-feed", qos), speed);
    }

    /**
     * Starts publishing on a daemon thread from {@code source.simTime()}.
     *
     * @param simDuration simulated time to cover; null runs until {@link #stop()}
     */
    public synchronized void start(FeedSource source, Duration simDuration) {
        start(source, simDuration, Double.isInfinite(speed) ? null : new SimClock(source.simTime(), speed));
    }

    /**
     * Starts publishing paced by a given simulated clock (the demo shares one clock between the
     * simulator and the daemon, so hold times run in simulated time on both sides).
     */
    public synchronized void start(FeedSource source, Duration simDuration, SimClock simClock) {
        if (worker != null) throw new IllegalStateException("this publisher was already started");
        Instant origin = source.simTime();
        Instant end = simDuration == null ? null : origin.plus(simDuration);
        clock = simClock;
        Thread t = new Thread(() -> run(source, end), "byre-feed-publisher");
        t.setDaemon(true);
        worker = t;
        t.start();
    }

    /**
     * The simulated clock the pacing follows (simulated start at the moment of {@link #start}).
     * Empty before start and when publishing flat out.
     */
    public Optional<Clock> clock() { return Optional.ofNullable(clock); }

    public long published() { return published.get(); }

    /** Why publishing ended early, if it did (for example, the broker went away). */
    public Optional<Throwable> failure() { return Optional.ofNullable(failure); }

    public boolean isRunning() { return worker != null && finished.getCount() > 0; }

    /** Waits until the simulated duration is covered, publishing failed, or stop() was called. */
    public boolean awaitFinished(Duration timeout) throws InterruptedException {
        return finished.await(timeout.toMillis(), TimeUnit.MILLISECONDS);
    }

    /** Stops promptly: wakes the pacing wait, waits for the thread, disconnects. Safe to call twice. */
    public void stop() {
        stopRequested.countDown();
        Thread t = worker;
        if (t != null && t != Thread.currentThread()) {
            try {
                t.join(STOP_JOIN_MS);
                if (t.isAlive()) {            // stuck in a publish: the sink's close unblocks it
                    closeSink();
                    t.join(STOP_JOIN_MS);
                }
            } catch (InterruptedException e) {
                Thread.currentThread().interrupt();
            }
        }
        closeSink();
    }

    @Override
    public void close() { stop(); }

    private void run(FeedSource source, Instant end) {
        try {
            while (!stopped()) {
                if (end != null && !source.simTime().isBefore(end)) break;
                List<FeedMessage> batch = source.step();
                for (FeedMessage m : batch) {
                    if (end != null && !m.simTime().isBefore(end)) break;
                    if (!waitFor(m.simTime())) return;
                    sink.publish(m);
                    published.incrementAndGet();
                }
            }
        } catch (InterruptedException e) {
            Thread.currentThread().interrupt();
        } catch (Exception e) {
            if (!stopped()) failure = e;
        } finally {
            closeSink();
            finished.countDown();
        }
    }

    /** Sleeps until simulated instant {@code t} is due; false when stop() came first. */
    private boolean waitFor(Instant t) throws InterruptedException {
        SimClock c = clock;
        if (c == null) return !stopped();
        long nanos = c.nanosUntil(t);
        if (nanos <= 0) return !stopped();
        return !stopRequested.await(nanos, TimeUnit.NANOSECONDS);
    }

    private boolean stopped() { return stopRequested.getCount() == 0; }

    private void closeSink() {
        synchronized (this) {
            if (sinkClosed) return;
            sinkClosed = true;
        }
        sink.close();
    }
}
