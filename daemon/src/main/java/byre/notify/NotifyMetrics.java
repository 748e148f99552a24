package byre.notify;

import io.micrometer.core.instrument.Counter;
import io.micrometer.core.instrument.Gauge;
import io.micrometer.core.instrument.MeterRegistry;
import java.sql.SQLException;
import java.time.Clock;
import java.time.Duration;

/** Delivery counters per channel (and per failure reason), outbox depth and the age of its oldest event. */
public final class NotifyMetrics {
    private final MeterRegistry registry;

    public NotifyMetrics(MeterRegistry registry, Outbox outbox, Clock clock) {
        this.registry = registry;
        Gauge.builder("byre.notify.outbox.depth", outbox, o -> {
            try {
                return o.depth();
            } catch (SQLException e) {
                return Double.NaN;
            }
        }).description("Deliveries waiting in the outbox").register(registry);
        Gauge.builder("byre.notify.outbox.oldest.seconds", outbox, o -> {
            try {
                return o.oldestPending().map(t -> (double) Duration.between(t, clock.instant()).toSeconds()).orElse(0.0);
            } catch (SQLException e) {
                return Double.NaN;
            }
        }).description("Age of the oldest undelivered event").register(registry);
    }

    void attempt(String channel) {
        counter("byre.notify.attempts", "Delivery attempts", channel).increment();
    }

    void delivered(String channel) {
        counter("byre.notify.delivered", "Messages delivered", channel).increment();
    }

    void failed(String channel, FailureReason reason) {
        Counter.builder("byre.notify.failures").description("Failed delivery attempts by reason")
                .tag("channel", channel).tag("reason", reason.tag()).register(registry).increment();
    }

    void givenUp(String channel) {
        counter("byre.notify.given.up", "Deliveries abandoned after the give-up age", channel).increment();
    }

    void folded(String channel, int n) {
        counter("byre.notify.folded", "Events folded into a rate-limit summary", channel).increment(n);
    }

    private Counter counter(String name, String description, String channel) {
        return Counter.builder(name).description(description).tag("channel", channel).register(registry);
    }
}
