package byre.config;

import java.time.Duration;
import java.time.LocalTime;
import java.util.List;

/**
 * {@code digest:} (a morning summary at {@code at}, site time zone, through {@code notify}; null {@code digestAt}
 * = off) and {@code self-alerts:} (channels told about byre's own trouble; a channel failing for
 * {@code channelFailingAfter} raises an alert through the others).
 */
public record AlertSettings(LocalTime digestAt, List<String> digestNotify, List<String> selfAlertNotify,
                            Duration channelFailingAfter) {
    public static final Duration DEFAULT_CHANNEL_FAILING_AFTER = Duration.ofMinutes(15);

    public AlertSettings {
        digestNotify = List.copyOf(digestNotify);
        selfAlertNotify = List.copyOf(selfAlertNotify);
    }

    public static AlertSettings defaults() {
        return new AlertSettings(null, List.of(), List.of(), DEFAULT_CHANNEL_FAILING_AFTER);
    }
}
