package byre.central;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import byre.admin.OpenAlert;
import byre.alerts.AlertEvent;
import byre.history.HistoryStore;
import byre.log.RateLimitedLog;
import ch.qos.logback.classic.Logger;
import ch.qos.logback.classic.spi.ILoggingEvent;
import ch.qos.logback.core.read.ListAppender;
import io.micrometer.core.instrument.simple.SimpleMeterRegistry;
import java.nio.charset.StandardCharsets;
import java.nio.file.Path;
import java.time.Duration;
import java.time.Instant;
import java.util.List;
import java.util.concurrent.atomic.AtomicLong;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.slf4j.LoggerFactory;

/**
 * A site's retained alert states at the centre: how one message is read (and why a bad one is refused), and what a state
 * changes in the centre's view of the site's open alerts, beside the events it keeps (on a real history file).
 */
class AlertStateTest {
    static final String TOPIC = "byre/larkmoor/alerts/heat-stress/cow-shed";

    @TempDir
    Path dir;

    /** An event as the barn writes it; {@code since} and {@code at} as minutes past 13:00. */
    static String state(String incident, String kind, int sinceMin, int atMin) {
        return "{\"id\":\"e-" + incident + "-" + kind + "\",\"incident\":\"" + incident + "\",\"event\":\"" + kind + "\",\"site\":\"larkmoor\","
                + "\"watch\":\"heat-stress\",\"zone\":\"cow-shed\",\"level\":\"warning\",\"quantity\":\"thi\",\"value\":73.4,\"unit\":\"\","
                + "\"since\":\"" + time(sinceMin) + "\",\"at\":\"" + time(atMin) + "\",\"message\":\"Heat stress in cow-shed\"}";
    }

    static Instant time(int minutesPast13) {
        return Instant.parse("2026-07-14T13:00:00Z").plus(Duration.ofMinutes(minutesPast13));
    }

    static AlertStateMessage read(String topic, String payload) {
        return AlertStateMessage.read("byre/", topic, payload.getBytes(StandardCharsets.UTF_8));
    }

    static String refusal(String topic, String payload) {
        return assertThrows(IllegalArgumentException.class, () -> read(topic, payload)).getMessage();
    }

    @Test
    void aStateIsReadFromItsTopicAndEventJson() {
        AlertStateMessage raised = read(TOPIC, state("i1", "raised", 5, 35));
        assertEquals(List.of("larkmoor", "heat-stress", "cow-shed", "i1"), List.of(raised.site(), raised.watch(), raised.zone(), raised.incident()));
        assertTrue(raised.open());
        assertFalse(read(TOPIC, state("i1", "cleared", 5, 50)).open());
        assertTrue(read(TOPIC, state("i1", "acknowledged", 5, 40)).open(), "any later event of an open incident says open");
        AlertStateMessage emptied = read(TOPIC, "");
        assertNull(emptied.event());
        assertFalse(emptied.open());
    }

    @Test
    void aMalformedStateIsRefusedSayingWhy() {
        assertEquals("it is not event JSON (Unexpected end-of-input within/between Object entries at line 1, column 10)", refusal(TOPIC, "{\"value\":"));
        assertEquals("an alert event must be a JSON object", refusal(TOPIC, "[1,2]"));
        assertEquals("unknown event kind 'opened'", refusal(TOPIC, state("i1", "opened", 5, 35)));
        assertEquals("a 'digest' event is not the state of an alert", refusal(TOPIC, state("i1", "digest", 5, 35)));
        assertEquals("it names no incident", refusal(TOPIC, state("", "raised", 5, 35)));
        assertEquals("it is the state of watch 'heat-stress' in zone 'cow-shed', not of the topic's 'heat-stress' in 'calf-barn'",
                refusal("byre/larkmoor/alerts/heat-stress/calf-barn", state("i1", "raised", 5, 35)));
        assertEquals("it says site 'larkmoor', not the topic's 'brackenhill'",
                refusal("byre/brackenhill/alerts/heat-stress/cow-shed", state("i1", "raised", 5, 35)));
        assertEquals("the topic is not byre/<site>/alerts/<watch>/<zone>", refusal("byre/larkmoor/alerts/heat-stress", state("i1", "raised", 5, 35)));
        assertEquals("'soon' is not an ISO 8601 instant", refusal(TOPIC, state("i1", "raised", 5, 35).replace(time(35).toString(), "soon")));
        assertTrue(refusal(TOPIC, "x".repeat(AlertStateMessage.MAX_BYTES + 1)).startsWith("it is 16385 bytes, more than the 16384"));
    }

    @Test
    void statesCorrectTheOpenAlertsWithoutStoringAnEvent() throws Exception {
        try (HistoryStore store = HistoryStore.open(dir.resolve("central.db")); SiteEventLog log = new SiteEventLog(store.openSyncedConnection())) {
            // The centre never saw i1's events: its state adds it, marked, once however often it comes.
            SiteEventLog.StateChange c = log.apply(read(TOPIC, state("i1", "raised", 5, 35)));
            assertEquals(List.of("i1"), c.added().stream().map(i -> i.id()).toList());
            OpenAlert a = log.openAlerts().get(0);
            assertEquals(List.of("i1", "larkmoor/cow-shed", "warning"), List.of(a.incident(), a.zone(), a.level()));
            assertEquals(time(5), a.since());
            assertTrue(a.fromAlertState());
            assertEquals("larkmoor", log.siteOf("i1"), "it can be acknowledged from the centre");
            assertTrue(log.apply(read(TOPIC, state("i1", "raised", 5, 35))).none());
            assertEquals(List.of(), log.events(null), "the events stay the record: a state stores none");

            // Its events update it as any; its cleared state ends it.
            assertTrue(SiteEventLogTest.record(log, SiteEventLogTest.event("e4", "i1", "acknowledged", "Ann")));
            assertEquals("Ann", log.openAlerts().get(0).acknowledgedBy());
            assertTrue(log.openAlerts().get(0).fromAlertState(), "still known only from its state and later events");
            assertEquals(List.of("i1"), log.apply(read(TOPIC, state("i1", "cleared", 5, 50))).removed().stream().map(i -> i.id()).toList());
            assertTrue(log.openAlerts().isEmpty());

            // Raised by its event, its clear missed: the cleared state ends it.
            SiteEventLogTest.record(log, SiteEventLogTest.event("e5", "i2", "raised", null));
            assertFalse(log.openAlerts().get(0).fromAlertState());
            log.apply(read(TOPIC, state("i2", "cleared", 5, 50)));
            assertTrue(log.openAlerts().isEmpty());

            // An old state (its cleared event is stored) adds nothing.
            SiteEventLogTest.record(log, SiteEventLogTest.event("e6", "i3", "raised", null));
            SiteEventLogTest.record(log, SiteEventLogTest.event("e7", "i3", "cleared", null));
            assertTrue(log.apply(read(TOPIC, state("i3", "raised", 5, 35))).none());
            assertTrue(log.openAlerts().isEmpty());
        }
    }

    @Test
    void oneIncidentPerWatchAndZone() throws Exception {
        try (HistoryStore store = HistoryStore.open(dir.resolve("central.db")); SiteEventLog log = new SiteEventLog(store.openSyncedConnection())) {
            // i1 raised by its event at 13:35; the site's state is now i2, begun at 14:00: i1 ended unseen.
            SiteEventLogTest.record(log, SiteEventLogTest.event("e1", "i1", "raised", null));
            SiteEventLog.StateChange c = log.apply(read(TOPIC, state("i2", "raised", 60, 61)));
            assertEquals(List.of("i1"), c.removed().stream().map(i -> i.id()).toList());
            assertEquals(List.of("i2"), log.openAlerts().stream().map(OpenAlert::incident).toList());
            // A state written before i2 began is older: it neither ends i2 nor comes back.
            assertTrue(log.apply(read(TOPIC, state("i0", "raised", 5, 35))).none());
            assertTrue(log.apply(read(TOPIC, state("i0", "cleared", 5, 40))).none());
            // Another site's state of the same incident id changes nothing here.
            assertTrue(log.apply(read("byre/brackenhill/alerts/heat-stress/cow-shed", state("i2", "cleared", 60, 70)
                    .replace("\"site\":\"larkmoor\"", "\"site\":\"brackenhill\""))).none());
            assertEquals(1, log.openAlerts().size());
            // An emptied slot ends what its state told; an alert its events opened waits for its clear.
            assertEquals(1, log.apply(read(TOPIC, "")).removed().size());
            SiteEventLogTest.record(log, SiteEventLogTest.event("e9", "i5", "raised", null));
            assertTrue(log.apply(read(TOPIC, "")).none());
            assertEquals(List.of("i5"), log.openAlerts().stream().map(OpenAlert::incident).toList());
        }
    }

    @Test
    void badStatesAreCountedAndLoggedOnceAMinuteAndHeldOnesApplyWhenTheirSiteJoins() throws Exception {
        AtomicLong nanos = new AtomicLong();
        ListAppender<ILoggingEvent> logged = new ListAppender<>();
        logged.start();
        Logger logger = (Logger) LoggerFactory.getLogger("byre.test.AlertState");
        logger.addAppender(logged);
        SimpleMeterRegistry registry = new SimpleMeterRegistry();
        try (HistoryStore store = HistoryStore.open(dir.resolve("central.db")); SiteEventLog log = new SiteEventLog(store.openSyncedConnection())) {
            SiteAlertStates states = new SiteAlertStates("byre/", log, new RateLimitedLog(logger, Duration.ofMinutes(1), nanos::get), registry);
            for (int i = 0; i < 50; i++) states.accept("larkmoor", TOPIC, ("{\"event\":\"raised\" " + i).getBytes(StandardCharsets.UTF_8));
            states.accept("larkmoor", TOPIC, new byte[] {(byte) 0xff, 0x00, 0x7b});
            assertEquals(51.0, registry.counter("byre.central.alert.states", "result", "rejected").count());
            assertEquals(1, logged.list.size(), "once a minute per site");
            String line = logged.list.get(0).getFormattedMessage();
            assertTrue(line.startsWith("site larkmoor: alert state on larkmoor/alerts/heat-stress/cow-shed ignored: "), line);
            assertTrue(log.openAlerts().isEmpty());

            states.accept("larkmoor", TOPIC, state("i1", "raised", 5, 35).getBytes(StandardCharsets.UTF_8));
            assertEquals(1.0, registry.counter("byre.central.alert.states", "result", "added").count());

            // A site not known yet: its state waits for it to join; a refused one's is let go.
            String fellside = "byre/fellside/alerts/heat-stress/cow-shed";
            String fell = state("i7", "raised", 5, 35).replace("larkmoor", "fellside");
            states.hold("fellside", fellside, fell.getBytes(StandardCharsets.UTF_8));
            states.hold("brackenhill", "byre/brackenhill/alerts/heat-stress/cow-shed",
                    fell.replace("fellside", "brackenhill").getBytes(StandardCharsets.UTF_8));
            assertEquals(2, states.held());
            assertEquals(1, log.openAlerts().size());
            states.refused("brackenhill");
            states.joined("fellside");
            assertEquals(0, states.held());
            assertEquals(List.of("i1", "i7"), log.openAlerts().stream().map(OpenAlert::incident).toList());
            assertEquals("fellside/cow-shed", log.openAlerts().get(1).zone());
        } finally {
            logger.detachAppender(logged);
        }
    }
}
