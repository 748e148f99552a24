package byre.history;

import static org.awaitility.Awaitility.await;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.nio.file.Path;
import java.time.Duration;
import java.time.Instant;
import java.util.List;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

class RetentionTest {

    static final Instant T = Instant.parse("2025-03-01T00:00:00Z");
    static final List<StreamKey> KEYS = List.of(StreamKey.sensor("pen1-dry"), StreamKey.sensor("pen2-dry"));

    @TempDir Path dir;

    @Test
    void prunesOnlyRowsOlderThanEachLevelsAgeInSmallSteps() {
        TestClock clock = new TestClock(T);
        Retention keep = new Retention(Duration.ofDays(1), Duration.ofDays(2), Duration.ofDays(3));
        try (HistoryStore store = HistoryStore.open(dir.resolve("history.db"), clock);
             HistoryWriter writer = HistoryWriter.start(store, keep, clock,
                 WriterSettings.builder().retention(Duration.ofDays(365), 100).build())) {
            Path db = store.path();
            // Readings every 30 s over [T-20h, T): 2400 per stream, 1200 minutes, 20 hours.
            for (long s = 0; s < 20 * 3600; s += 30) {
                for (StreamKey k : KEYS) writer.append(k, T.minus(Duration.ofHours(20)).plusSeconds(s), s);
            }
            assertTrue(writer.flush());
            assertEquals(4800, StoredReadings.count(db));

            // Now T+10h: raw cutoff T-14h, so the 6 oldest hours of raw rows go; no rollup is old enough.
            clock.advance(Duration.ofHours(10));
            writer.requestRetention();
            await().atMost(Duration.ofSeconds(20)).until(() -> StoredReadings.count(db) == 4800 - 2 * 720);
            long cutoff = T.minus(Duration.ofHours(14)).toEpochMilli();
            assertEquals(cutoff, StoredReadings.minTs(db).orElseThrow(), "nothing newer than the cutoff is removed");
            assertEquals(2400, Sql.number(db, "SELECT count(*) FROM rollup_minute"));
            assertEquals(40, Sql.number(db, "SELECT count(*) FROM rollup_hour"));
            // 720 old rows per stream in steps of at most 100 rows.
            assertEquals(100, writer.stats().maxRetentionStepRows());
            assertTrue(writer.stats().retentionSteps() >= 2 * 8, "steps: " + writer.stats().retentionSteps());

            // T+40h: every raw row is past 1 day; minutes before T-8h are past 2 days; hours still kept.
            clock.advance(Duration.ofHours(30));
            writer.requestRetention();
            await().atMost(Duration.ofSeconds(20)).until(() -> Sql.number(db, "SELECT count(*) FROM rollup_minute") == 2 * 480);
            assertEquals(0, StoredReadings.count(db));
            assertEquals(T.minus(Duration.ofHours(8)).toEpochMilli(), Sql.number(db, "SELECT min(ts) FROM rollup_minute"));
            assertEquals(40, Sql.number(db, "SELECT count(*) FROM rollup_hour"));

            // T+70h: hour buckets starting before T-2h are past 3 days.
            clock.advance(Duration.ofHours(30));
            writer.requestRetention();
            await().atMost(Duration.ofSeconds(20)).until(() -> Sql.number(db, "SELECT count(*) FROM rollup_hour") == 2 * 2);
            assertEquals(T.minus(Duration.ofHours(2)).toEpochMilli(), Sql.number(db, "SELECT min(ts) FROM rollup_hour"));
            assertEquals(0, Sql.number(db, "SELECT count(*) FROM rollup_minute"));
            assertEquals(100, writer.stats().maxRetentionStepRows());
            assertEquals(4800 + 2400 + 36, writer.stats().retentionRowsDeleted());
            assertTrue(writer.stats().healthy());
        }
    }

    @Test
    void retentionAgesMustBePositiveAndOrdered() {
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class,
            () -> new Retention(Duration.ofDays(30), Duration.ofDays(14), Duration.ofDays(365)));
        assertEquals("history keep-raw (PT720H) must not be longer than keep-minute (PT336H)", e.getMessage());
        e = assertThrows(IllegalArgumentException.class, () -> new Retention(Duration.ZERO, Duration.ofDays(14), Duration.ofDays(365)));
        assertEquals("history keep-raw must be a positive duration, got PT0S", e.getMessage());
        assertEquals(Duration.ofDays(14), Retention.DEFAULT.keepRaw());
        assertEquals(Duration.ofDays(90), Retention.DEFAULT.keepMinute());
    }
}
