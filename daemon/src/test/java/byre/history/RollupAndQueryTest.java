package byre.history;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.nio.file.Path;
import java.time.Duration;
import java.time.Instant;
import java.util.ArrayList;
import java.util.HashMap;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.Random;
import java.util.TreeMap;
import org.junit.jupiter.api.AfterEach;
import org.junit.jupiter.api.BeforeEach;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/**
 * Rollups and bucket queries against a brute-force recomputation from the raw readings in the test itself
 * (plain arithmetic: min, max, mean = sum / count).
 */
class RollupAndQueryTest {

    static final Instant T0 = Instant.parse("2025-07-14T10:00:00Z");
    static final List<StreamKey> KEYS = List.of(StreamKey.sensor("pen1-dry"), StreamKey.sensor("pen1-wet"), StreamKey.sensor("shed2-rh"));

    @TempDir Path dir;
    HistoryStore store;
    HistoryWriter writer;
    /** First value seen per (stream, ts): what the history must keep. */
    final Map<StreamKey, TreeMap<Long, Double>> truth = new HashMap<>();

    @BeforeEach
    void fill() {
        TestClock clock = new TestClock(T0.plus(Duration.ofHours(3)));
        store = HistoryStore.open(dir.resolve("history.db"), clock);
        // 37-row batches: minute and hour buckets are split across many batches.
        writer = HistoryWriter.start(store, Retention.DEFAULT, clock, WriterSettings.builder().batchRows(37).commitEvery(Duration.ofHours(1)).firstBatchAtOnce(false).build());
        Random rnd = new Random(42);
        for (StreamKey k : KEYS) truth.put(k, new TreeMap<>());
        // 2.5 hours, every 7 s (does not divide a minute), plus about 10 % redeliveries with other values.
        for (long ms = 0; ms < Duration.ofMinutes(150).toMillis(); ms += 7_000) {
            for (StreamKey k : KEYS) {
                long ts = T0.toEpochMilli() + ms;
                double v = Math.round((15 + 10 * rnd.nextGaussian()) * 100) / 100.0;
                writer.append(k, ts, v);
                truth.get(k).putIfAbsent(ts, v);
                if (rnd.nextInt(10) == 0) {
                    long back = ts - 7_000L * rnd.nextInt(20);
                    if (back >= T0.toEpochMilli()) writer.append(k, back, v + 100);
                }
            }
        }
        assertTrue(writer.flush());
    }

    @AfterEach
    void close() {
        writer.close();
        store.close();
    }

    record Agg(long n, double lo, double hi, double sum) {}

    static Map<Long, Agg> expected(TreeMap<Long, Double> rows, long widthMs) {
        Map<Long, Agg> out = new LinkedHashMap<>();
        rows.forEach((ts, v) -> out.merge(Math.floorDiv(ts, widthMs) * widthMs, new Agg(1, v, v, v),
            (a, b) -> new Agg(a.n + b.n, Math.min(a.lo, b.lo), Math.max(a.hi, b.hi), a.sum + b.sum)));
        return out;
    }

    static void assertMatches(Map<Long, Agg> expected, List<RollupRow> actual, Duration width) {
        assertEquals(expected.size(), actual.size());
        int i = 0;
        for (Map.Entry<Long, Agg> e : expected.entrySet()) {
            RollupRow r = actual.get(i++);
            Agg a = e.getValue();
            assertEquals(Instant.ofEpochMilli(e.getKey()), r.start());
            assertEquals(width, r.width());
            assertEquals(a.n, r.count());
            assertEquals(a.lo, r.min());
            assertEquals(a.hi, r.max());
            assertEquals(a.sum / a.n, r.mean(), 1e-9);
        }
    }

    @Test
    void rawRowsKeepTheFirstValueOfEachTime() {
        try (HistoryReader r = store.openReader()) {
            for (StreamKey k : KEYS) {
                List<HistoryRow> rows = r.raw(k, null, null);
                assertEquals(truth.get(k).size(), rows.size());
                for (HistoryRow row : rows) assertEquals(truth.get(k).get(row.at().toEpochMilli()), row.value());
            }
        }
        assertTrue(writer.stats().rowsDuplicate() > 0, "the data set must contain redeliveries");
    }

    @Test
    void latestTimesAreTheNewestRawTimesOldestFirst() {
        try (HistoryReader r = store.openReader()) {
            for (StreamKey k : KEYS) {
                List<HistoryRow> rows = r.raw(k, null, null);
                long[] all = rows.stream().mapToLong(row -> row.at().toEpochMilli()).toArray();
                long[] newest = java.util.Arrays.copyOfRange(all, Math.max(0, all.length - 7), all.length);
                org.junit.jupiter.api.Assertions.assertArrayEquals(newest, r.latestTimes(k, null, null, 7));
                assertEquals(all.length, r.latestTimes(k, null, null, all.length + 10).length);
            }
        }
    }

    @Test
    void minuteAndHourRollupsMatchARecomputationFromTheRawReadings() {
        try (HistoryReader r = store.openReader()) {
            for (StreamKey k : KEYS) {
                assertMatches(expected(truth.get(k), 60_000), r.rollups(k, Resolution.MINUTE, null, null), Duration.ofMinutes(1));
                assertMatches(expected(truth.get(k), 3_600_000), r.rollups(k, Resolution.HOUR, null, null), Duration.ofHours(1));
            }
        }
    }

    @Test
    void bucketsOfAnyWidthMatchARecomputation() {
        StreamKey k = KEYS.get(1);
        try (HistoryReader r = store.openReader()) {
            for (Duration every : List.of(Duration.ofSeconds(90), Duration.ofMinutes(15), Duration.ofHours(2))) {
                assertMatches(expected(truth.get(k), every.toMillis()), r.buckets(k, every, null, null), every);
            }
            // [from, to) is widened to whole buckets: 10:20..10:40 covers the 10:15, 10:30 quarter hours.
            List<RollupRow> quarters = r.buckets(k, Duration.ofMinutes(15), T0.plus(Duration.ofMinutes(20)), T0.plus(Duration.ofMinutes(40)));
            assertEquals(List.of(T0.plus(Duration.ofMinutes(15)), T0.plus(Duration.ofMinutes(30))), quarters.stream().map(RollupRow::start).toList());
            assertEquals(15 * 60 / 7 + 1, quarters.get(0).count(), "a whole quarter hour of 7 s readings, not a part");
            IllegalArgumentException e = assertThrows(IllegalArgumentException.class, () -> r.buckets(k, Duration.ZERO, null, null));
            assertEquals("bucket width must be at least 1 ms, got PT0S", e.getMessage());
        }
    }

    @Test
    void latestValuesAndTimeOrderedMerge() {
        try (HistoryReader r = store.openReader()) {
            List<HistoryRow> latest = r.latest();
            assertEquals(KEYS, latest.stream().map(HistoryRow::stream).toList());
            for (HistoryRow row : latest) {
                Map.Entry<Long, Double> last = truth.get(row.stream()).lastEntry();
                assertEquals(new HistoryRow(row.stream(), Instant.ofEpochMilli(last.getKey()), last.getValue()), row);
            }
            assertEquals(latest.get(0), r.latest(KEYS.get(0)).orElseThrow());
            assertTrue(r.latest(StreamKey.sensor("no-such-sensor")).isEmpty());

            Instant from = T0.plus(Duration.ofMinutes(30));
            Instant to = T0.plus(Duration.ofMinutes(60));
            List<HistoryRow> merged = new ArrayList<>();
            r.forEachRawInTimeOrder(KEYS, from, to, merged::add);
            int expectedCount = 0;
            for (StreamKey k : KEYS) expectedCount += truth.get(k).subMap(from.toEpochMilli(), to.toEpochMilli()).size();
            assertEquals(expectedCount, merged.size());
            for (int i = 1; i < merged.size(); i++) {
                HistoryRow a = merged.get(i - 1);
                HistoryRow b = merged.get(i);
                assertTrue(a.at().isBefore(b.at()) || (a.at().equals(b.at()) && KEYS.indexOf(a.stream()) < KEYS.indexOf(b.stream())),
                    "out of order at " + i + ": " + a + " then " + b);
            }
        }
    }

    @Test
    void readersWorkWhileTheWriterWrites() {
        try (HistoryReader r = store.openReader()) {
            int[] seen = {0};
            r.forEachRaw(KEYS.get(0), null, null, row -> {
                // Writing in the middle of a streaming read: the reader keeps its snapshot, the writer is not blocked.
                if (seen[0]++ == 0) {
                    writer.append(KEYS.get(0), T0.plus(Duration.ofHours(2).plusMinutes(45)), 1.0);
                    assertTrue(writer.flush(Duration.ofSeconds(10)));
                }
            });
            assertEquals(truth.get(KEYS.get(0)).size(), seen[0]);
            assertEquals(truth.get(KEYS.get(0)).size() + 1, r.raw(KEYS.get(0), null, null).size());
        }
    }
}
