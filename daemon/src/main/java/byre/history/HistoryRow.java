package byre.history;

import java.time.Instant;

/** One stored raw reading (or the latest value of a stream). */
public record HistoryRow(StreamKey stream, Instant at, double value) {
}
