package byre.alerts;

import static org.junit.jupiter.api.Assertions.assertEquals;

import java.time.Duration;
import java.time.Instant;
import java.time.ZoneId;
import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.Optional;
import org.junit.jupiter.api.Test;

/**
 * Every event kind, worded by the one text function, for two watches: THI heat in the cow shed (a quantity
 * with published bands) and dry-bulb cold in a calf pen (none). The README's "Messages" examples are these.
 */
class EventTextTest {
    static final Instant T0 = Instant.parse("2026-07-14T13:35:00Z");
    static final ZoneId LONDON = ZoneId.of("Europe/London");

    static final AlertPolicy HEAT = new AlertPolicy(List.of("night-phone"), Duration.ofHours(1), Duration.ofMinutes(45), List.of("office"));
    static final AlertPolicy COLD = new AlertPolicy(List.of("night-phone"), Duration.ofHours(2), Duration.ofMinutes(30), List.of("office"));

    static WatchOutcome heat(WatchOutcome.Kind kind, Instant at, double thi, String text) {
        return new WatchOutcome(kind, "heat-danger", "cow-shed", "critical", "thi", thi, "", T0.minus(Duration.ofMinutes(20)), at, text, HEAT);
    }

    static WatchOutcome cold(WatchOutcome.Kind kind, Instant at, double dryBulbC, String text) {
        return new WatchOutcome(kind, "calf-cold", "calf-pen-2", "warning", "dry-bulb", dryBulbC, "C", T0.minus(Duration.ofMinutes(30)), at,
                text, COLD);
    }

    /** Every message of one episode: raised, escalated, reminder, acknowledged, cleared, in that order. */
    static List<String> episode(IncidentBook b, WatchOutcome raise, WatchOutcome clear) {
        List<String> out = new ArrayList<>();
        List<AlertEvent> events = new ArrayList<>(b.accept(raise));
        events.addAll(b.tick(raise.at().plus(Duration.ofHours(2))));
        for (AlertEvent e : events) out.add(e.kind().id() + ": " + e.message());
        AckResult ack = b.acknowledge(events.get(0).incident(), "Dana", raise.at().plus(Duration.ofMinutes(130)));
        out.add("acknowledged: " + ack.events().get(0).message());
        out.add("ack sentence: " + ack.detail());
        for (AlertEvent e : b.accept(clear)) out.add(e.kind().id() + ": " + e.message());
        return out;
    }

    @Test
    void theThiWatchNamesSiteZoneLevelValueAndBandAndItsAllClearSaysWhatEndedWithoutTheAdvice() {
        IncidentBook b = new IncidentBook("larkmoor", IdSource.counting());
        List<String> texts = episode(b,
                heat(WatchOutcome.Kind.RAISED, T0, 83.70250000000001, "THI danger in cow-shed: 83.7. Cool the cows now."),
                heat(WatchOutcome.Kind.CLEARED, T0.plus(Duration.ofMinutes(185)), 76.94, ""));
        assertEquals(List.of(
                // THI 83.7 is in the LWSI danger band, 79 to 83 (LCI 1970, as given by Harrington and Bowles 2002)
                "raised: ALERT at larkmoor, cow-shed: heat-danger (critical), THI 83.7, danger band. THI danger in cow-shed: 83.7."
                        + " Cool the cows now. Incident i1; acknowledge: byre ack i1.",
                "escalated: ESCALATED at larkmoor, cow-shed: heat-danger (critical) open 1 h 5 min, not acknowledged;"
                        + " THI 83.7, danger band when raised. THI danger in cow-shed: 83.7. Cool the cows now. Incident i1; acknowledge: byre ack i1.",
                "reminder: Reminder at larkmoor, cow-shed: heat-danger (critical) open 1 h 20 min, not acknowledged;"
                        + " THI 83.7, danger band when raised. THI danger in cow-shed: 83.7. Cool the cows now. Incident i1; acknowledge: byre ack i1.",
                "acknowledged: Acknowledged by Dana at larkmoor, cow-shed: heat-danger (critical), open 2 h 30 min;"
                        + " no more reminders or escalation. Incident i1.",
                "ack sentence: acknowledged: heat-danger in cow-shed, open 2 h 30 min",
                // 76.9 is in the LWSI alert band, 75 to 78
                "cleared: All clear at larkmoor, cow-shed: heat-danger ended after 3 h 25 min; THI now 76.9, alert band. Incident i1."),
                texts);
    }

    @Test
    void theDryBulbWatchHasNoBandAndItsOwnClearMessageReplacesTheDefault() {
        IncidentBook b = new IncidentBook("larkmoor", IdSource.counting());
        List<String> texts = episode(b,
                cold(WatchOutcome.Kind.RAISED, T0, 8.04, "Calves in calf-pen-2 are below their lower critical temperature. Check bedding and jackets"),
                cold(WatchOutcome.Kind.CLEARED, T0.plus(Duration.ofMinutes(200)), 12.3, "calf-pen-2 is back to 12.3 C; jackets can come off"));
        assertEquals(List.of(
                "raised: ALERT at larkmoor, calf-pen-2: calf-cold (warning), dry-bulb 8.0 C. Calves in calf-pen-2 are below their lower"
                        + " critical temperature. Check bedding and jackets. Incident i1; acknowledge: byre ack i1.",
                "escalated: ESCALATED at larkmoor, calf-pen-2: calf-cold (warning) open 1 h, not acknowledged; dry-bulb 8.0 C when raised."
                        + " Calves in calf-pen-2 are below their lower critical temperature. Check bedding and jackets. Incident i1; acknowledge: byre ack i1.",
                "reminder: Reminder at larkmoor, calf-pen-2: calf-cold (warning) open 2 h 30 min, not acknowledged; dry-bulb 8.0 C when raised."
                        + " Calves in calf-pen-2 are below their lower critical temperature. Check bedding and jackets. Incident i1; acknowledge: byre ack i1.",
                "acknowledged: Acknowledged by Dana at larkmoor, calf-pen-2: calf-cold (warning), open 2 h 40 min; no more reminders or escalation. Incident i1.",
                "ack sentence: acknowledged: calf-cold in calf-pen-2, open 2 h 40 min",
                "cleared: All clear at larkmoor, calf-pen-2 (calf-cold, 3 h 50 min): calf-pen-2 is back to 12.3 C; jackets can come off. Incident i1."),
                texts);
    }

    @Test
    void usUnitsAndAnAcknowledgementLinkWhereOneIsConfigured() {
        AckLinks links = id -> Optional.of("https://barn.larkmoor.test/a/" + id + "/1784040000/5f2c");
        IncidentBook b = new IncidentBook("larkmoor", IdSource.counting(), new EventText("larkmoor", true, links));
        // 8.04 C = 46.5 F (F = C * 9/5 + 32, common practice)
        assertEquals("ALERT at larkmoor, calf-pen-2: calf-cold (warning), dry-bulb 46.5 F. Incident i1;"
                + " acknowledge: https://barn.larkmoor.test/a/i1/1784040000/5f2c", b.accept(cold(WatchOutcome.Kind.RAISED, T0, 8.04, "")).get(0).message());
        // the all-clear carries the id only: there is nothing left to acknowledge
        assertEquals("All clear at larkmoor, calf-pen-2: calf-cold ended after 1 h 10 min; dry-bulb now 54.1 F. Incident i1.",
                b.accept(cold(WatchOutcome.Kind.CLEARED, T0.plus(Duration.ofMinutes(40)), 12.3, "")).get(0).message());
    }

    @Test
    void testSummaryAndDigestAreWordedHereToo() {
        EventText text = EventText.metric("larkmoor");
        assertEquals("Test at larkmoor: if you can read this, channel night-phone works. Incident test-1784036100.",
                text.test("night-phone", "test-1784036100"));

        IncidentBook b = new IncidentBook("larkmoor", IdSource.counting());
        AlertEvent heat = b.accept(heat(WatchOutcome.Kind.RAISED, T0, 83.7, "Cool the cows now.")).get(0);
        AlertEvent cold = b.accept(cold(WatchOutcome.Kind.RAISED, T0, 8.0, "")).get(0);
        assertEquals("Held back at larkmoor: 3 messages over the rate limit of night-phone: ALERT: heat-danger cow-shed (critical)"
                        + " (incident i1); ALERT: calf-cold calf-pen-2 (warning) (incident i2); and 1 more.",
                text.summary("night-phone", List.of(heat, cold), 3));

        Map<String, double[]> shed = new LinkedHashMap<>();
        shed.put("thi", new double[] {64.04, 83.7});
        Map<String, Duration> bands = new LinkedHashMap<>();
        bands.put("normal", Duration.ofMinutes(540));
        bands.put("alert", Duration.ofMinutes(90));
        bands.put("danger", Duration.ofMinutes(90));
        Map<String, double[]> pen = new LinkedHashMap<>();
        pen.put("dry-bulb", new double[] {7.96, 14.2});
        NightDigest night = new NightDigest(Instant.parse("2026-07-13T19:00:00Z"), Instant.parse("2026-07-14T07:00:00Z"),
                List.of(new NightDigest.ZoneNight("cow-shed", shed, Map.of(), bands),
                        new NightDigest.ZoneNight("calf-pen-2", pen, Map.of("dry-bulb", "C"), Map.of())),
                List.of(new NightDigest.IncidentSpan("calf-cold", "calf-pen-2", "warning", Instant.parse("2026-07-14T02:10:00Z"),
                        Instant.parse("2026-07-14T05:30:00Z"))),
                List.of());
        assertEquals("""
                Night at larkmoor, 20:00-08:00

                cow-shed
                  THI 64.0 to 83.7
                  THI bands: normal 9 h, alert 1.5 h, danger 1.5 h

                calf-pen-2
                  dry-bulb 8.0 C to 14.2 C

                Alerts (1):
                  calf-cold calf-pen-2 (warning) 03:10-06:30, 3 h 20 min
                """, text.digest(night, LONDON));
        assertEquals(text.digest(night, LONDON), DigestBuilder.event("e9", "larkmoor", night, LONDON, List.of("office")).message());
    }

    @Test
    void eventJsonValuesKeepTheDecimalsThatCarryMeaning() {
        assertEquals(83.7, EventText.rounded("thi", 83.70250000000001));
        assertEquals(0.0, EventText.rounded("dry-bulb", -0.04), "no -0.0");
        assertEquals(1.24, EventText.rounded("air-speed", 1.2350000001));
        assertEquals(1.234, EventText.rounded("vpd", 1.23449));
        assertEquals(612.0, EventText.rounded("solar", 611.6));
    }
}
