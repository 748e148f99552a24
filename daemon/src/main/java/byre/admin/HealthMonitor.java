package byre.admin;

import byre.daemon.HealthSnapshot;
import java.time.Duration;
import java.util.ArrayList;
import java.util.List;
import java.util.function.LongSupplier;
import java.util.function.Supplier;

/**
 * Turns the daemon's {@link HealthSnapshot} into a verdict. Healthy means: the broker is connected, or has been
 * reconnecting for less than {@code brokerGrace} (a broker restart or a short network cut is normal); the history
 * writer's last write succeeded; the pipeline thread turned its loop within {@code stallAfter}; and the broker delivered
 * something within the time the sensors' reporting intervals allow while connected (a link that is connected but
 * hears nothing is as bad as none, and only a restart may cure it). The time of the
 * first disconnected sample is remembered here, so call {@link #check()} regularly (the watchdog does).
 */
public final class HealthMonitor {
    /** Defaults: five minutes of reconnecting, thirty seconds of a stuck pipeline. */
    public static final Duration BROKER_GRACE = Duration.ofMinutes(5);
    public static final Duration STALL_AFTER = Duration.ofSeconds(30);

    private final Supplier<HealthSnapshot> source;
    private final LongSupplier nanoTime;
    private final long graceNanos;
    private final long stallMillis;
    private long disconnectedSinceNanos;
    private boolean disconnected;

    public HealthMonitor(Supplier<HealthSnapshot> source, LongSupplier nanoTime, Duration brokerGrace, Duration stallAfter) {
        this.source = source;
        this.nanoTime = nanoTime;
        this.graceNanos = brokerGrace.toNanos();
        this.stallMillis = stallAfter.toMillis();
    }

    public HealthMonitor(Supplier<HealthSnapshot> source) {
        this(source, System::nanoTime, BROKER_GRACE, STALL_AFTER);
    }

    public synchronized Health check() {
        HealthSnapshot s = source.get();
        long now = nanoTime.getAsLong();
        List<String> problems = new ArrayList<>();
        if (s.brokerConnected()) {
            disconnected = false;
        } else {
            if (!disconnected) {
                disconnected = true;
                disconnectedSinceNanos = now;
            }
            long forNanos = now - disconnectedSinceNanos;
            if (forNanos >= graceNanos) {
                problems.add("broker: not connected for " + Duration.ofNanos(forNanos).toSeconds() + " s ("
                        + blankAsUnknown(s.brokerError()) + ")");
            }
        }
        if (s.receiveQuietLimitMillis() > 0 && s.receiveQuietMillis() >= s.receiveQuietLimitMillis()) {
            problems.add("broker: connected but no message received for " + minutes(s.receiveQuietMillis()) + " (the sensors'"
                    + " reporting intervals allow " + minutes(s.receiveQuietLimitMillis()) + "); check that the sensors report"
                    + " and that the broker lets byre read their topics");
        }
        if (!s.historyHealthy()) {
            problems.add("history: writes failing (" + blankAsUnknown(s.historyError()) + "); " + s.historyQueue() + " rows waiting");
        }
        if (s.pipelineIdleMillis() >= stallMillis) {
            problems.add(s.pipelineIdleMillis() == Long.MAX_VALUE ? "pipeline: not started"
                    : "pipeline: no progress for " + s.pipelineIdleMillis() / 1000 + " s with " + s.pipelineQueue() + " zone readings queued");
        }
        return new Health(problems.isEmpty(), problems);
    }

    private static String minutes(long millis) {
        return millis < 120_000 ? millis / 1000 + " s" : millis / 60_000 + " min";
    }

    private static String blankAsUnknown(String s) {
        return s == null || s.isBlank() ? "no detail" : s;
    }
}
