package byre.central;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertTrue;

import byre.alerts.AlertEvent;
import byre.history.HistoryStore;
import java.nio.file.Path;
import java.time.Instant;
import java.util.List;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/** The sites' events at the centre: once each by id, in arrival order, open incidents surviving a restart. */
class SiteEventLogTest {
    @TempDir
    Path dir;

    static String event(String id, String incident, String kind, String by) {
        return "{\"id\":\"" + id + "\",\"incident\":\"" + incident + "\",\"event\":\"" + kind + "\",\"site\":\"larkmoor\","
                + "\"watch\":\"heat-stress\",\"zone\":\"cow-shed\",\"level\":\"warning\",\"quantity\":\"thi\",\"value\":73.4,"
                + "\"unit\":\"\",\"since\":\"2026-07-14T13:05:00Z\",\"at\":\"2026-07-14T13:35:00Z\",\"message\":\"Heat stress\""
                + (by == null ? "" : ",\"by\":\"" + by + "\"") + "}";
    }

    static boolean record(SiteEventLog log, String json) throws Exception {
        return log.record("larkmoor", AlertEvent.fromJson(json), json, Instant.parse("2026-07-14T13:35:01Z"));
    }

    @Test
    void eachEventOnceInOrderAndOpenIncidentsAfterARestart() throws Exception {
        Path db = dir.resolve("central.db");
        try (HistoryStore store = HistoryStore.open(db); SiteEventLog log = new SiteEventLog(store.openSyncedConnection())) {
            assertTrue(record(log, event("e1", "i1", "raised", null)));
            assertFalse(record(log, event("e1", "i1", "raised", null)), "delivered twice, kept once");
            assertTrue(record(log, event("e2", "i2", "raised", null)));
            assertTrue(record(log, event("e3", "i1", "cleared", null)));
            assertTrue(record(log, event("e4", "i2", "acknowledged", "Ann")));
            assertEquals(List.of("e1", "e2", "e3", "e4"), log.events("larkmoor").stream().map(s -> s.event().id()).toList());
        }
        try (HistoryStore store = HistoryStore.open(db); SiteEventLog log = new SiteEventLog(store.openSyncedConnection())) {
            assertEquals(1, log.openAlerts().size());
            var open = log.openAlerts().get(0);
            assertEquals("i2", open.incident());
            assertEquals("larkmoor/cow-shed", open.zone(), "zones as central zone ids");
            assertEquals("Ann", open.acknowledgedBy());
            assertEquals("larkmoor", log.siteOf("i2"));
            assertNull(log.siteOf("i1"), "cleared");
            assertFalse(record(log, event("e4", "i2", "acknowledged", "Ann")), "still known after the restart");
        }
    }

    @Test
    void eventsOlderThanTheKeepGoOnceTheirIncidentIsClearedButAnOpenIncidentKeepsAllOfIts() throws Exception {
        Path db = dir.resolve("central.db");
        Instant day0 = Instant.parse("2026-07-01T06:00:00Z");
        try (HistoryStore store = HistoryStore.open(db); SiteEventLog log = new SiteEventLog(store.openSyncedConnection(), java.time.Duration.ofDays(14))) {
            String raised1 = event("e1", "i1", "raised", null);
            String raised2 = event("e2", "i2", "raised", null);
            String cleared1 = event("e3", "i1", "cleared", null);
            log.record("larkmoor", AlertEvent.fromJson(raised1), raised1, day0);
            log.record("larkmoor", AlertEvent.fromJson(raised2), raised2, day0.plusSeconds(60));
            log.record("larkmoor", AlertEvent.fromJson(cleared1), cleared1, day0.plusSeconds(3600));
            // Another site reuses incident id i2 and clears it: that says nothing about larkmoor's i2.
            String other = event("e4", "i2", "cleared", null);
            log.record("northfield", AlertEvent.fromJson(other), other, day0.plusSeconds(7200));
            assertEquals(List.of("e1", "e2", "e3"), log.events("larkmoor").stream().map(x -> x.event().id()).toList());
            // Fifteen days later the next event prunes: i1 (cleared) goes, the still open i2 stays.
            String later = event("e5", "i5", "raised", null);
            log.record("larkmoor", AlertEvent.fromJson(later), later, day0.plus(java.time.Duration.ofDays(15)));
            assertEquals(List.of("e2", "e5"), log.events("larkmoor").stream().map(x -> x.event().id()).toList());
            assertEquals(List.of(), log.events("northfield"), "northfield's i2 is cleared and past the keep");
        }
        try (HistoryStore store = HistoryStore.open(db); SiteEventLog log = new SiteEventLog(store.openSyncedConnection())) {
            assertEquals(List.of("i2", "i5"), log.openAlerts().stream().map(a -> a.incident()).sorted().toList(),
                "larkmoor's open incident survives the pruning and the restart");
        }
    }
}
