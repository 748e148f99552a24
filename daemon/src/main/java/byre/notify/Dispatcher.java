package byre.notify;

import byre.alerts.AlertEvent;
import byre.alerts.EventKind;
import byre.alerts.EventText;
import byre.alerts.IdSource;
import java.sql.SQLException;
import java.time.Clock;
import java.time.Duration;
import java.time.Instant;
import java.util.ArrayList;
import java.util.HashMap;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.Random;
import java.util.concurrent.ConcurrentHashMap;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;

/**
 * Delivers outbox rows. Per channel, strictly in event order: the next event waits until the one before it is
 * delivered or given up. A failed attempt is retried after 5 s, doubling up to 10 min, with ±20 % jitter so
 * that many byres do not hammer a receiver in step; after the give-up age (default 24 h) the row is abandoned,
 * logged and counted. At most N messages per channel in any 10 minutes: when only one slot is left and more
 * than one event waits, they are folded into a single summary.
 *
 * <p>Live, one thread per channel (a slow receiver delays nobody else). Tests call {@link #runOnce()}.
 */
public final class Dispatcher implements AutoCloseable {
    private static final Logger LOG = LoggerFactory.getLogger(Dispatcher.class);
    public static final Duration FIRST_RETRY = Duration.ofSeconds(5);
    public static final Duration MAX_RETRY = Duration.ofMinutes(10);
    public static final Duration RATE_WINDOW = Duration.ofMinutes(10);
    private static final int FOLD_BATCH = 500;
    private static final long IDLE_WAIT_MS = 30_000;

    private final Outbox outbox;
    private final Map<String, Channel> channels;
    private final Map<String, ChannelFactory.Policy> policies;
    private final Clock clock;
    private final Random random;
    private final IdSource ids;
    private final String site;
    private final NotifyMetrics metrics;
    private final Map<String, Instant> failingSince = new ConcurrentHashMap<>();
    private final Map<String, String> lastFailure = new ConcurrentHashMap<>();
    /** Per channel: its thread waits here, and a wake that came while it was busy is remembered. */
    private final Map<String, Wakeup> locks = new HashMap<>();

    private static final class Wakeup {
        boolean pending;
    }
    private final List<Thread> threads = new ArrayList<>();
    private volatile boolean running;

    public Dispatcher(Outbox outbox, Map<String, Channel> channels, Map<String, ChannelFactory.Policy> policies, Clock clock,
                      Random random, IdSource ids, String site, NotifyMetrics metrics) {
        this.outbox = outbox;
        this.channels = new LinkedHashMap<>(channels);
        this.policies = new HashMap<>(policies);
        this.clock = clock;
        this.random = random;
        this.ids = ids;
        this.site = site;
        this.metrics = metrics;
        for (String c : channels.keySet()) locks.put(c, new Wakeup());
    }

    /** Starts one delivery thread per channel; undelivered rows from before a restart go first. */
    public synchronized void start() {
        if (running) return;
        running = true;
        dropUnknownChannels();
        try {
            int n = outbox.retryNow(clock.instant());
            if (n > 0) LOG.info("notify: {} undelivered message(s) from before the restart are tried now", n);
        } catch (java.sql.SQLException e) {
            LOG.warn("notify: cannot bring waiting deliveries forward: {}", e.getMessage());
        }
        for (String name : channels.keySet()) {
            Thread t = new Thread(() -> loop(name), "notify-" + name);
            t.setDaemon(true);
            threads.add(t);
            t.start();
        }
    }

    /** Wakes the delivery threads (call after new rows were committed). */
    public void wake() {
        for (Wakeup w : locks.values()) {
            synchronized (w) {
                w.pending = true;
                w.notifyAll();
            }
        }
    }

    /** One synchronous pass over every channel at the clock's time: delivers everything that is due. */
    public void runOnce() {
        dropUnknownChannels();
        for (String name : channels.keySet()) pass(name);
    }

    /** Channels whose last attempt failed, with the time of the first failure in that streak. */
    public Map<String, Instant> failingSince() {
        return Map.copyOf(failingSince);
    }

    /** The last failure of a channel, for status screens. */
    public String lastFailure(String channel) {
        return lastFailure.get(channel);
    }

    private void loop(String name) {
        Wakeup lock = locks.get(name);
        while (running) {
            synchronized (lock) {
                lock.pending = false; // from here on a wake means: look again
            }
            Instant next = pass(name);
            long waitMs = next == null ? IDLE_WAIT_MS : Math.max(1, Duration.between(clock.instant(), next).toMillis());
            synchronized (lock) {
                if (!running) break;
                // Woken while the pass ran (an event committed after it had looked): without this the event would
                // wait for the next wake or the idle timeout, 30 s.
                if (lock.pending) continue;
                try {
                    lock.wait(Math.min(waitMs, IDLE_WAIT_MS));
                } catch (InterruptedException e) {
                    Thread.currentThread().interrupt();
                    return;
                }
            }
        }
    }

    /** Delivers what is due on one channel; returns when it should be looked at again (null: nothing pending). */
    Instant pass(String name) {
        try {
            return deliverDue(name);
        } catch (SQLException | RuntimeException e) {
            LOG.error("notify {}: outbox error: {}", name, e.getMessage());
            return clock.instant().plusSeconds(5);
        }
    }

    private Instant deliverDue(String name) throws SQLException {
        Channel channel = channels.get(name);
        ChannelFactory.Policy policy = policies.getOrDefault(name, ChannelFactory.Policy.defaults());
        while (true) {
            Instant now = clock.instant();
            List<Outbox.Row> rows = outbox.pending(name, FOLD_BATCH);
            if (rows.isEmpty()) return null;
            Outbox.Row head = rows.get(0);
            if (!now.isBefore(head.created().plus(policy.giveUp()))) {
                outbox.givenUp(head, now, "gave up after " + policy.giveUp().toHours() + " h");
                metrics.givenUp(name);
                LOG.error("notify {}: gave up on event {} ({}) after {} attempts over {}; last error: {}", name, head.eventId(),
                        head.kind(), head.attempts(), policy.giveUp(), head.lastError());
                continue;
            }
            if (head.nextAt().isAfter(now)) return head.nextAt();
            Outbox.Sent sent = outbox.sentSince(name, now.minus(RATE_WINDOW));
            int free = policy.perTenMinutes() - sent.count();
            if (free <= 0) return sent.oldest().plus(RATE_WINDOW);
            if (free == 1 && rows.size() > 1 && !EventKind.SUMMARY.id().equals(head.kind())) {
                outbox.fold(name, rows, summary(name, rows, now), now);
                metrics.folded(name, rows.size());
                LOG.warn("notify {}: rate limit of {} per 10 min reached; {} events folded into one summary", name,
                        policy.perTenMinutes(), rows.size());
                continue;
            }
            metrics.attempt(name);
            AlertEvent event = AlertEvent.fromJson(head.body());
            DeliveryResult r = channel.deliver(event);
            Instant after = clock.instant();
            if (r.ok()) {
                outbox.delivered(head, after);
                metrics.delivered(name);
                if (failingSince.remove(name) != null) LOG.info("notify {}: delivering again", name);
                lastFailure.remove(name);
                continue;
            }
            int attempts = head.attempts() + 1;
            Instant next = after.plus(backoff(attempts));
            outbox.failed(head, next, r.reason(), r.detail());
            metrics.failed(name, r.reason());
            failingSince.putIfAbsent(name, after);
            lastFailure.put(name, r.toString());
            if (attempts == 1 || Integer.bitCount(attempts) == 1) { // 1st, 2nd, 4th, 8th ... failure: no log flood
                LOG.warn("notify {}: attempt {} for event {} failed ({}): {}; next try at {}", name, attempts, head.eventId(),
                        r.reason().tag(), r.detail(), next);
            }
            return next;
        }
    }

    /** The wait after the {@code attempts}-th failure: 5 s doubling to 10 min, times a jitter in [0.8, 1.2]. */
    Duration backoff(int attempts) {
        long base = FIRST_RETRY.toMillis() << Math.min(attempts - 1, 20);
        base = Math.min(base, MAX_RETRY.toMillis());
        double jitter = 0.8 + 0.4 * random.nextDouble();
        return Duration.ofMillis(Math.min(MAX_RETRY.toMillis(), Math.round(base * jitter)));
    }

    private AlertEvent summary(String channel, List<Outbox.Row> rows, Instant now) {
        List<String> ids = new ArrayList<>();
        List<AlertEvent> listed = new ArrayList<>();
        for (Outbox.Row r : rows) {
            ids.add(r.eventId());
            if (listed.size() < 12) {
                try {
                    listed.add(AlertEvent.fromJson(r.body()));
                } catch (RuntimeException ignored) {
                    // a row we cannot read is still counted
                }
            }
        }
        String text = EventText.metric(site).summary(channel, listed, rows.size());
        return new AlertEvent(this.ids.eventId(now), null, EventKind.SUMMARY, site, null, null, null, null, Double.NaN, null,
                rows.get(0).created(), now, text, null, ids, List.of());
    }

    private void dropUnknownChannels() {
        try {
            for (String c : outbox.channelsWithPending()) {
                if (channels.containsKey(c)) continue;
                Instant now = clock.instant();
                for (Outbox.Row r : outbox.pending(c, Integer.MAX_VALUE)) {
                    outbox.givenUp(r, now, "channel " + c + " is no longer configured");
                }
                LOG.warn("notify: undelivered events for channel {} dropped: it is no longer in the configuration", c);
            }
        } catch (SQLException e) {
            LOG.error("notify: outbox error: {}", e.getMessage());
        }
    }

    /** Stops the threads after their current attempt (a running attempt ends by its own timeout). */
    @Override
    public void close() {
        synchronized (this) {
            running = false;
        }
        wake();
        for (Thread t : threads) {
            try {
                t.join(15_000);
            } catch (InterruptedException e) {
                Thread.currentThread().interrupt();
            }
        }
        threads.clear();
    }
}
