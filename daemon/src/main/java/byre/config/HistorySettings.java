package byre.config;

import java.nio.file.Path;
import java.time.Duration;

/**
 * Where the history lives, how long each resolution is kept, and how often readings are committed
 * ({@code commit-every}: QoS 1 readings are acknowledged to the broker after the commit that holds them).
 */
public record HistorySettings(Path path, Duration keepRaw, Duration keepMinute, Duration keepHour, Duration commitEvery) {
    /** The default commit interval: a few seconds of readings held only by the broker, few writes to the card. */
    public static final Duration DEFAULT_COMMIT_EVERY = Duration.ofSeconds(2);

    public HistorySettings withPath(Path p) {
        return new HistorySettings(p, keepRaw, keepMinute, keepHour, commitEvery);
    }
}
