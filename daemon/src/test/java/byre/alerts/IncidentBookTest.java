package byre.alerts;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertTrue;

import byre.json.Json;
import java.time.Duration;
import java.time.Instant;
import java.util.List;
import java.util.Map;
import org.junit.jupiter.api.Test;

/** The incident state machine: what is sent to whom, minute by minute. */
class IncidentBookTest {
    static final Instant T0 = Instant.parse("2026-07-14T13:35:00Z");
    static final AlertPolicy HEAT = new AlertPolicy(List.of("night-phone"), Duration.ofHours(2), Duration.ofMinutes(45), List.of("office"));

    static WatchOutcome raised(Instant at) {
        return new WatchOutcome(WatchOutcome.Kind.RAISED, "heat-stress", "cows", "warning", "thi", 73.4, "",
                Instant.parse("2026-07-14T13:05:00Z"), at, "Heat stress in cows: THI 73.4. Check fans and water.", HEAT);
    }

    static WatchOutcome cleared(Instant at) {
        return new WatchOutcome(WatchOutcome.Kind.CLEARED, "heat-stress", "cows", "warning", "thi", 69.84, "", null, at, "", HEAT);
    }

    static String brief(List<AlertEvent> events) {
        StringBuilder sb = new StringBuilder();
        for (AlertEvent e : events) sb.append(e.kind().id()).append("->").append(String.join("+", e.channels())).append(' ');
        return sb.toString().strip();
    }

    @Test
    void anEpisodeMinuteByMinute() {
        IncidentBook b = new IncidentBook("larkmoor", IdSource.counting());
        // {minute after T0, what happens, expected events}
        Object[][] table = {
            {0, "raise", "raised->night-phone"},
            {1, "tick", ""},
            {44, "tick", ""},
            {45, "tick", "escalated->office"},
            {46, "tick", ""},
            {119, "tick", ""},
            {120, "tick", "reminder->night-phone+office"},
            {121, "raise", ""},           // a repeated RAISED (restart of the rule engine) sends nothing
            {239, "tick", ""},
            {240, "tick", "reminder->night-phone+office"},
            {300, "clear", "cleared->night-phone+office"},
            {301, "tick", ""},
            {302, "clear", ""},           // nothing open any more
        };
        for (Object[] row : table) {
            Instant at = T0.plus(Duration.ofMinutes((Integer) row[0]));
            List<AlertEvent> out = switch ((String) row[1]) {
                case "raise" -> b.accept(raised(at));
                case "clear" -> b.accept(cleared(at));
                default -> b.tick(at);
            };
            assertEquals(row[2], brief(out), "minute " + row[0] + " " + row[1]);
        }
    }

    @Test
    void theNameOfWhoAcknowledgedIsOneShortLineOnEveryPath() {
        IncidentBook b = new IncidentBook("larkmoor", IdSource.counting());
        b.accept(raised(T0));
        // What an MQTT payload or a signed link could carry: a forged log line, a terminal escape, a right-to-left override.
        String by = "Dana\r\nWARN  byre.alerts - cleared warning heat-stress cows\u001b[31m\u202e" + "y".repeat(80);
        AckResult ack = b.acknowledge(" i1\n", by, T0.plus(Duration.ofMinutes(10)));
        assertEquals(AckResult.Status.ACKNOWLEDGED, ack.status());
        String who = ack.events().get(0).by();
        assertEquals("Dana WARN byre.alerts - cleared warning heat-stress cows [31m yy", who);
        assertEquals(AckBy.MAX_BY, who.length());
        assertTrue(ack.events().get(0).message().startsWith("Acknowledged by Dana WARN"), ack.events().get(0).message());
        String already = b.acknowledge("i1", "Sam", T0).detail();
        assertTrue(already.contains("(by " + who + ", "), already);
        assertEquals("someone", AckBy.clean("\u0000\t \u2028", "someone"));
        AckResult unknown = b.acknowledge("i9\nERROR forged", "Sam", T0);
        assertTrue(unknown.detail().startsWith("no open incident 'i9 ERROR forged'"), unknown.detail());
        assertEquals(AckResult.Status.INVALID, b.acknowledge("\u0007\u0000", "Sam", T0).status());
    }

    @Test
    void acknowledgementStopsRemindersAndEscalationAndClearStillTellsEveryoneTold() {
        IncidentBook b = new IncidentBook("larkmoor", IdSource.counting());
        AlertEvent raised = b.accept(raised(T0)).get(0);
        assertEquals("i1", raised.incident());
        AckResult ack = b.acknowledge("i1", "Dana", T0.plus(Duration.ofMinutes(10)));
        assertEquals(AckResult.Status.ACKNOWLEDGED, ack.status());
        assertEquals("acknowledged->night-phone", brief(ack.events()));
        assertEquals("Dana", ack.events().get(0).by());
        assertEquals(AckResult.Status.ALREADY, b.acknowledge("i1", "Sam", T0.plus(Duration.ofMinutes(11))).status());
        assertEquals(AckResult.Status.UNKNOWN, b.acknowledge("nope", "Sam", T0).status());
        assertEquals(AckResult.Status.INVALID, b.acknowledge(" ", "Sam", T0).status());
        for (int m = 11; m < 600; m += 7) assertEquals("", brief(b.tick(T0.plus(Duration.ofMinutes(m)))), "minute " + m);
        List<AlertEvent> c = b.accept(cleared(T0.plus(Duration.ofHours(10))));
        assertEquals("cleared->night-phone", brief(c));
        assertEquals("i1", c.get(0).incident());
        // since 13:05, cleared 23:35: 10 h 30 min; the all-clear does not repeat "Check fans and water."
        assertEquals("All clear at larkmoor, cows: heat-stress ended after 10 h 30 min; THI now 69.8, normal band. Incident i1.", c.get(0).message());
        assertEquals("acknowledged: heat-stress in cows, open 40 min", ack.detail(), "the sentence byre ack prints");
    }

    @Test
    void afterAPauseOnlyOneReminderGoesOut() {
        IncidentBook b = new IncidentBook("larkmoor", IdSource.counting());
        b.accept(raised(T0));
        // the daemon was stopped for 9 hours: one escalation and one reminder, not four reminders
        assertEquals("escalated->office reminder->night-phone+office", brief(b.tick(T0.plus(Duration.ofHours(9)))));
    }

    @Test
    void aRestartDoesNotRepeatRaisedAndKeepsTheSchedule() {
        IncidentBook before = new IncidentBook("larkmoor", IdSource.counting());
        before.accept(raised(T0));
        before.tick(T0.plus(Duration.ofMinutes(45)));
        String snap = before.snapshot();

        IncidentBook after = new IncidentBook("larkmoor", IdSource.counting());
        assertNull(after.restore(snap));
        assertEquals("", brief(after.accept(raised(T0.plus(Duration.ofMinutes(50))))));
        assertEquals("", brief(after.tick(T0.plus(Duration.ofMinutes(60)))), "escalation is not repeated");
        assertEquals("reminder->night-phone+office", brief(after.tick(T0.plus(Duration.ofMinutes(120)))));
        assertEquals("i1", after.openIncidents().get(0).id());
        assertEquals("cleared->night-phone+office", brief(after.accept(cleared(T0.plus(Duration.ofMinutes(130))))));
    }

    @Test
    void aDamagedSnapshotIsReportedNotThrown() {
        IncidentBook b = new IncidentBook("larkmoor", IdSource.counting());
        String why = b.restore("[{\"key\":1");
        assertTrue(why.startsWith("incident snapshot could not be read"), why);
        assertTrue(b.openIncidents().isEmpty());
    }

    @Test
    void selfAlertsLeaveTheFailingChannelOutAndDoNotRepeat() {
        IncidentBook b = new IncidentBook("larkmoor", IdSource.counting());
        b.setSelfAlertChannels(List.of("night-phone", "office", "barn-siren"));
        List<AlertEvent> up = b.selfAlert(IncidentBook.CHANNEL_FAILING, "office", true, "Channel office has been failing", T0, List.of("office"));
        assertEquals("raised->night-phone+barn-siren", brief(up));
        assertEquals("channel-failing", up.get(0).watch());
        assertEquals("byre", up.get(0).zone());
        assertEquals("", brief(b.selfAlert(IncidentBook.CHANNEL_FAILING, "office", true, "again", T0.plusSeconds(60), List.of("office"))));
        assertEquals("raised->night-phone+office+barn-siren", brief(b.selfAlert("history-disk", true, "History disk is full", T0)));
        assertEquals("cleared->night-phone+barn-siren",
                brief(b.selfAlert(IncidentBook.CHANNEL_FAILING, "office", false, "Channel office delivers again", T0.plusSeconds(600), List.of("office"))));
    }

    @Test
    void eventJsonHasTheFieldsOfTheDesignInOrder() {
        IncidentBook b = new IncidentBook("larkmoor", IdSource.counting());
        String json = b.accept(raised(T0)).get(0).toJson();
        assertEquals("{\"id\":\"e1\",\"incident\":\"i1\",\"event\":\"raised\",\"site\":\"larkmoor\",\"watch\":\"heat-stress\","
                + "\"zone\":\"cows\",\"level\":\"warning\",\"quantity\":\"thi\",\"value\":73.4,\"unit\":\"\","
                + "\"since\":\"2026-07-14T13:05:00Z\",\"at\":\"2026-07-14T13:35:00Z\","
                + "\"message\":\"ALERT at larkmoor, cows: heat-stress (warning), THI 73.4, normal band. Heat stress in cows: THI 73.4."
                + " Check fans and water. Incident i1; acknowledge: byre ack i1.\"}", json);
        AlertEvent back = AlertEvent.fromJson(json);
        assertEquals(json, back.toJson());
        AlertEvent ack = b.acknowledge("i1", "Dana", T0).events().get(0);
        assertEquals("Dana", ((Map<?, ?>) Json.parse(ack.toJson())).get("by"));
    }

    @Test
    void randomIdsAreUniqueAndIncidentIdsShort() {
        IdSource ids = IdSource.random();
        java.util.Set<String> seen = new java.util.HashSet<>();
        for (int i = 0; i < 10_000; i++) assertTrue(seen.add(ids.eventId(T0)));
        assertTrue(ids.incidentId(T0).matches("[2-9a-km-np-z]{10}"));
    }
}
