package byre.history;

import java.time.Duration;
import java.time.Instant;

/** Summary of one time bucket [start, start + width) of one stream. {@code mean} is sum / count. */
public record RollupRow(StreamKey stream, Instant start, Duration width, double min, double max, double mean, long count) {
}
