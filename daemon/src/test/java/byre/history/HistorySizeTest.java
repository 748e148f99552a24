package byre.history;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Duration;
import java.time.Instant;
import java.util.Random;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/** A size check, not a timing check: the target is under 40 bytes on disk per raw reading. */
class HistorySizeTest {

    @TempDir Path dir;

    @Test
    void aHundredThousandReadingsOfFiftyStreamsTakeUnderFortyBytesEach() throws Exception {
        Instant t0 = Instant.parse("2025-07-14T00:00:00Z");
        TestClock clock = new TestClock(t0.plus(Duration.ofDays(1)));
        int streams = 50;
        int rows = 100_000;
        Path db = dir.resolve("history.db");
        try (HistoryStore store = HistoryStore.open(db, clock)) {
            try (HistoryWriter writer = HistoryWriter.start(store, Retention.DEFAULT, clock)) {
                Random rnd = new Random(7);
                // Sensors reporting every 10 s in turn, values with two decimals, as they arrive live.
                for (int i = 0; i < rows; i++) {
                    int s = i % streams;
                    long ts = t0.toEpochMilli() + (i / streams) * 10_000L + s * 37L;
                    writer.append(StreamKey.sensor("shed" + s / 10 + "-sensor" + s), ts, Math.round((12 + 8 * rnd.nextDouble()) * 100) / 100.0);
                }
                assertTrue(writer.flush());
                assertEquals(rows, writer.stats().rowsWritten());
            }
            store.checkpoint();
        }
        assertEquals("ok", Sql.text(db, "PRAGMA integrity_check"));
        long bytes = Files.size(db);
        double perRow = bytes / (double) rows;
        System.out.printf("history size: %d bytes for %d readings = %.1f bytes per reading (rollups included)%n", bytes, rows, perRow);
        assertTrue(perRow < 40, "bytes per reading " + perRow);
    }
}
