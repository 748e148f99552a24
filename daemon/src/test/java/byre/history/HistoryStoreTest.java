package byre.history;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Clock;
import java.time.Duration;
import java.time.Instant;
import java.util.ArrayList;
import java.util.List;
import java.util.Map;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

class HistoryStoreTest {

    @TempDir Path dir;

    @Test
    void createsAFreshFileInWalModeAtTheLatestSchema() {
        Path db = dir.resolve("sub/folder/history.db");
        try (HistoryStore store = HistoryStore.open(db)) {
            assertEquals(HistoryStore.latestSchemaVersion(), store.schemaVersion());
        }
        assertEquals("wal", Sql.text(db, "PRAGMA journal_mode"));
        assertEquals(HistoryStore.latestSchemaVersion(), Sql.number(db, "PRAGMA user_version"));
        assertEquals(Migrations.APPLICATION_ID, Sql.number(db, "PRAGMA application_id"));
        assertEquals("stream,reading,rollup_minute,rollup_hour,state,outbox_event,sqlite_sequence,outbox_delivery,rollup_mark,site_event,reading_run",
            Sql.text(db, "SELECT group_concat(name) FROM (SELECT name FROM sqlite_schema WHERE type = 'table' ORDER BY rowid)"));
        // The raw table must be keyed by (stream, ts) without a hidden rowid: that is what keeps rows small.
        assertTrue(Sql.text(db, "SELECT sql FROM sqlite_schema WHERE name = 'reading'").contains("WITHOUT ROWID"));
    }

    @Test
    void reopeningKeepsDataAndDoesNotMigrateAgain() {
        Path db = dir.resolve("history.db");
        try (HistoryStore store = HistoryStore.open(db)) {
            store.putState("watch/heat-stress/cows", "raised");
        }
        try (HistoryStore store = HistoryStore.open(db)) {
            assertEquals(HistoryStore.latestSchemaVersion(), store.schemaVersion());
            assertEquals(Map.of("watch/heat-stress/cows", "raised"), store.loadState(""));
        }
        assertEquals("ok", Sql.text(db, "PRAGMA integrity_check"));
    }

    @Test
    void aNewerSchemaIsRefusedWithAClearMessage() {
        Path db = dir.resolve("history.db");
        HistoryStore.open(db).close();
        Sql.exec(db, "PRAGMA user_version = 99");
        HistoryException e = assertThrows(HistoryException.class, () -> HistoryStore.open(db));
        assertEquals("history " + db.toAbsolutePath() + " has schema version 99 but this byre knows only up to "
            + HistoryStore.latestSchemaVersion() + "; it was written by a newer byre. Upgrade byre, or move the file aside to start a new history.",
            e.getMessage());
        assertEquals(99, Sql.number(db, "PRAGMA user_version"), "a refused file is left untouched");
    }

    @Test
    void aForeignSqliteFileIsRefused() {
        Path db = dir.resolve("other.db");
        Sql.exec(db, "CREATE TABLE cows (name TEXT)");
        HistoryException e = assertThrows(HistoryException.class, () -> HistoryStore.open(db));
        assertEquals("history " + db.toAbsolutePath() + " already holds tables that are not a byre history; point history.path at a new file",
            e.getMessage());
    }

    @Test
    void aFileThatIsNotSqliteIsRefused() throws Exception {
        Path db = dir.resolve("notes.db");
        Files.writeString(db, "this is not a database, just some notes about the calf pens, long enough to fill a header ".repeat(20));
        HistoryException e = assertThrows(HistoryException.class, () -> HistoryStore.open(db));
        assertTrue(e.getMessage().startsWith("history " + db.toAbsolutePath() + ": cannot open: "), e.getMessage());
        assertTrue(e.getMessage().contains("not a database"), e.getMessage());
    }

    @Test
    void laterMigrationsApplyToAnExistingFileInOrder() {
        Path db = dir.resolve("history.db");
        try (HistoryStore store = HistoryStore.open(db)) {
            store.putState("k", "v");
        }
        List<Migration> extended = new ArrayList<>(Migrations.ALL);
        extended.add(new Migration(extended.size() + 1, "outbox for the test",
            List.of("CREATE TABLE outbox (id INTEGER PRIMARY KEY, body TEXT NOT NULL)")));
        try (HistoryStore store = HistoryStore.open(db, Clock.systemUTC(), extended)) {
            assertEquals(extended.size(), store.schemaVersion());
            assertEquals(Map.of("k", "v"), store.loadState(""));
        }
        assertEquals(extended.size(), Sql.number(db, "PRAGMA user_version"));
        assertEquals(0, Sql.number(db, "SELECT count(*) FROM outbox"));
    }

    @Test
    void aFailingMigrationLeavesTheFileAtTheOldVersion() {
        Path db = dir.resolve("history.db");
        HistoryStore.open(db).close();
        List<Migration> broken = new ArrayList<>(Migrations.ALL);
        broken.add(new Migration(broken.size() + 1, "half good",
            List.of("CREATE TABLE outbox (id INTEGER PRIMARY KEY)", "CREATE TABLE outbox (id INTEGER PRIMARY KEY)")));
        HistoryException e = assertThrows(HistoryException.class, () -> HistoryStore.open(db, Clock.systemUTC(), broken));
        assertTrue(e.getMessage().contains("already exists"), e.getMessage());
        assertEquals(Migrations.ALL.size(), Sql.number(db, "PRAGMA user_version"));
        assertEquals(0, Sql.number(db, "SELECT count(*) FROM sqlite_schema WHERE name = 'outbox'"));
    }

    @Test
    void migrationsMustBeNumberedInOrder() {
        List<Migration> gap = List.of(new Migration(1, "a", List.of()), new Migration(3, "c", List.of()));
        IllegalStateException e = assertThrows(IllegalStateException.class, () -> HistoryStore.checkMigrationList(gap));
        assertEquals("history migrations must be numbered 1, 2, 3... in order; entry 1 has version 3", e.getMessage());
        HistoryStore.checkMigrationList(Migrations.ALL);
    }

    @Test
    void stateIsStoredByKeyAndLoadedByPrefix() {
        TestClock clock = new TestClock(Instant.parse("2025-06-01T12:00:00Z"));
        Path db = dir.resolve("history.db");
        try (HistoryStore store = HistoryStore.open(db, clock)) {
            store.putState("watch/heat-stress/cows", "pending");
            store.putState("watch/calf-chill/calf-pen-1", "raised");
            store.putState("outbox/last", "17");
            clock.advance(Duration.ofMinutes(5));
            store.putState("watch/heat-stress/cows", "raised");
            assertEquals(Map.of("watch/calf-chill/calf-pen-1", "raised", "watch/heat-stress/cows", "raised"), store.loadState("watch/"));
            assertEquals(List.of("outbox/last", "watch/calf-chill/calf-pen-1", "watch/heat-stress/cows"), List.copyOf(store.loadState("").keySet()));
            store.deleteState("outbox/last");
            assertEquals(Map.of(), store.loadState("outbox/"));
            // Prefix characters that are wildcards in LIKE/GLOB must match literally.
            store.putState("a_b%c", "1");
            store.putState("axbyc", "2");
            assertEquals(Map.of("a_b%c", "1"), store.loadState("a_b%"));
        }
        assertEquals(clock.millis(), Sql.number(db, "SELECT updated FROM state WHERE key = 'watch/heat-stress/cows'"));
    }

    @Test
    void stateWritesAreNotBlockedByAnIdleWriter() {
        Path db = dir.resolve("history.db");
        try (HistoryStore store = HistoryStore.open(db);
             HistoryWriter writer = HistoryWriter.start(store, Retention.DEFAULT, Clock.systemUTC())) {
            writer.append(StreamKey.sensor("pen1-dry"), Instant.now(), 21.5);
            assertTrue(writer.flush());
            long t0 = System.nanoTime();
            store.putState("watch/x", "raised");
            // Not a timing test: a held write lock would make putState wait the full 5 s busy timeout or fail.
            assertTrue(System.nanoTime() - t0 < Duration.ofMillis(HistoryStore.BUSY_TIMEOUT_MS).toNanos());
            assertEquals(Map.of("watch/x", "raised"), store.loadState("watch/"));
        }
    }
}
