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

/**
 * A size check, not a timing check: the target is at most 25 bytes on disk per raw reading, rollups included.
 * With a row per reading it was 34.4; with the readings packed into runs 14.7, of which the minute rollups take 8.3
 * and the runs 5.3.
 */
class HistorySizeTest {

    @TempDir Path dir;

    @Test
    void aHundredThousandReadingsOfFiftyStreamsTakeAtMostTwentyFiveBytesEach() throws Exception {
        Instant t0 = Instant.parse("2025-07-14T00:00:00Z");
        // The clock follows the readings, so the rollups are written and the rows packed every ten minutes, as live.
        TestClock clock = new TestClock(t0.plusSeconds(1));
        int streams = 50;
        int rows = 100_000;
        Path db = dir.resolve("history.db");
        try (HistoryStore store = HistoryStore.open(db, clock)) {
            // A small queue holds the appender back to the writer's pace, as a live intake waits for it: the clock then
            // stays within a batch of the rows being written (without, it ran ahead and left whole batches as late rows).
            WriterSettings pace = WriterSettings.builder().batchRows(250).queueCapacity(250).build();
            try (HistoryWriter writer = HistoryWriter.start(store, Retention.DEFAULT, clock, pace)) {
                Random rnd = new Random(7);
                // Sensors reporting every 10 s in turn, values with two decimals, as they arrive live.
                for (int i = 0; i < rows; i++) {
                    int s = i % streams;
                    if (s == 0 && i > 0) clock.advance(Duration.ofSeconds(10));
                    long ts = t0.toEpochMilli() + (i / streams) * 10_000L + s * 37L;
                    assertTrue(writer.appendWaiting(StreamKey.sensor("shed" + s / 10 + "-sensor" + s), ts, Math.round((12 + 8 * rnd.nextDouble()) * 100) / 100.0, null));
                }
                assertTrue(writer.flush());
                assertEquals(rows, writer.stats().rowsWritten());
            }
            store.checkpoint();
        }
        assertEquals("ok", Sql.text(db, "PRAGMA integrity_check"));
        assertEquals(rows, StoredReadings.count(db));
        assertEquals(0, Sql.number(db, "SELECT count(*) FROM reading"), "every reading packed once its rollups are written");
        long bytes = Files.size(db);
        double perRow = bytes / (double) rows;
        System.out.printf("history size: %d bytes for %d readings = %.1f bytes per reading (rollups included)%n", bytes, rows, perRow);
        assertTrue(perRow <= 25, "bytes per reading " + perRow);
    }
}
