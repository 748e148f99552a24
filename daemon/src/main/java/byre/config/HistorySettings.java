package byre.config;

import java.nio.file.Path;
import java.time.Duration;

/** Where the history lives and how long each resolution is kept. */
public record HistorySettings(Path path, Duration keepRaw, Duration keepMinute, Duration keepHour) {
    public HistorySettings withPath(Path p) {
        return new HistorySettings(p, keepRaw, keepMinute, keepHour);
    }
}
