package byre.rules;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import byre.rules.eval.AlertState;
import byre.rules.eval.Transition;
import byre.rules.eval.WatchEngine;
import byre.units.Quantity;
import java.time.Duration;
import java.time.Instant;
import java.time.ZoneId;
import java.util.ArrayList;
import java.util.List;
import java.util.Map;
import org.junit.jupiter.api.Test;

/** Semantics of the rule language (README, Rule language) as scenarios: readings and ticks in, transitions with times out. */
class ScenarioTest {
    static final String HEAT = """
            watch heat
              raise when cows.thi >= 72 for 30m
              clear when cows.thi <= 70 for 20m
              notify night-phone
              message "Heat stress in {zone}: THI {value}. Check fans and water."
            """;

    /** Readings of one stream every {@code stepMin} minutes from..to (inclusive) with one value. */
    static String series(String zone, String q, String from, String to, int stepMin, String... values) {
        StringBuilder sb = new StringBuilder();
        Instant t = Scenario.time(from);
        Instant end = Scenario.time(to);
        int i = 0;
        while (!t.isAfter(end)) {
            sb.append(t).append(' ').append(zone).append(' ').append(q).append(' ').append(values[i++ % values.length]).append('\n');
            t = t.plusSeconds(60L * stepMin);
        }
        return sb.toString();
    }

    /** Interleaves several series in time order (lines start with ISO instants). */
    static String merge(String... parts) {
        return java.util.Arrays.stream(String.join("", parts).split("\n")).filter(l -> !l.isBlank()).sorted().reduce("", (a, b) -> a + b + "\n");
    }

    @Test
    void hysteresisHoldsTheAlertInsideTheBand() {
        Scenario s = new Scenario(HEAT, Scenario.farm());
        assertEquals(List.of("10:30 RAISED heat/cows 73.0", "12:35 CLEARED heat/cows 69.5"), s.run(
                series("cows", "thi", "10:00", "10:59", 1, "73")
                        + series("cows", "thi", "11:00", "12:14", 1, "71.5", "70.5") // inside the band: stays raised
                        + series("cows", "thi", "12:15", "12:40", 1, "69.5")));
    }

    @Test
    void holdInterruptedJustBeforeItCompletes() {
        Scenario s = new Scenario(HEAT, Scenario.farm());
        assertEquals(List.of("11:00 RAISED heat/cows 73.0"), s.run(
                series("cows", "thi", "10:00", "10:29", 1, "73")
                        + "10:29:59 cows thi 71.9\n" // one second short of the 30m hold
                        + series("cows", "thi", "10:30", "11:05", 1, "73")));
    }

    @Test
    void flappingAroundTheThresholdMakesNoEventStorm() {
        Scenario s = new Scenario(HEAT, Scenario.farm());
        assertEquals(List.of(), s.run(series("cows", "thi", "10:00", "16:00", 1, "71.9", "72.1")), "the hold never completes");
        Scenario noHold = new Scenario("""
                watch heat
                  raise when cows.thi >= 72
                  clear when cows.thi <= 70
                  notify office
                """, Scenario.farm());
        assertEquals(List.of("10:01 RAISED heat/cows 72.1"), noHold.run(series("cows", "thi", "10:00", "16:00", 1, "71.9", "72.1")),
                "one raise, then the band absorbs the flapping");
    }

    @Test
    void withoutAClearLineTheWatchClearsAfterTheRaiseHoldOfFalse() {
        Scenario s = new Scenario("""
                watch heat
                  raise when cows.thi >= 72 for 10m
                  notify office
                """, Scenario.farm());
        // Clearing from 10:20 is interrupted at 10:25 (back to raised, no event) and restarts at 10:26.
        assertEquals(List.of("10:10 RAISED heat/cows 73.0", "10:36 CLEARED heat/cows 71.0"), s.run(
                series("cows", "thi", "10:00", "10:19", 1, "73")
                        + series("cows", "thi", "10:20", "10:24", 1, "71")
                        + "10:25 cows thi 72.5\n"
                        + series("cows", "thi", "10:26", "10:40", 1, "71")));
    }

    @Test
    void missingDataNeverClearsARaisedAlert() {
        Scenario s = new Scenario(HEAT, Scenario.farm());
        List<String> out = s.run(series("cows", "thi", "10:00", "10:40", 1, "73") + "tick 11:00\ntick 14:00\ntick +1 10:00\n");
        assertEquals(List.of("10:30 RAISED heat/cows 73.0"), out);
        assertEquals(AlertState.RAISED, s.engine.state("heat", "cows"));
        assertEquals(List.of("+1 10:20".equals("") ? "" : "2026-01-16 10:20 CLEARED heat/cows 69.0"),
                s.run(series("cows", "thi", "+1 10:00", "+1 10:30", 1, "69")));
    }

    @Test
    void silentRaisesAfterTheFreshnessLimitPlusItsHoldAndClearsWhenDataReturns() {
        SimpleRuleContext ctx = Scenario.farm().defaultMaxAge(Duration.ofMinutes(5));
        String quiet = """
                watch quiet-sensor
                  raise when silent(cows.dry-bulb) for 10m
                  level warning
                  notify office
                """;
        Scenario s = new Scenario(quiet, ctx);
        assertEquals(List.of("10:15 RAISED quiet-sensor/cows 20.0", "11:10 CLEARED quiet-sensor/cows 21.0"), s.run(
                series("cows", "dry-bulb", "09:00", "10:00", 1, "20") + "tick 10:14:59\ntick 10:15\ntick 10:59\n"
                        + series("cows", "dry-bulb", "11:00", "11:20", 1, "21")));
        // A stream that never reported is silent counted from the engine's first time.
        Scenario fresh = new Scenario(quiet, ctx);
        assertEquals(List.of("09:15 RAISED quiet-sensor/cows n/a".replace("n/a", "NaN")), fresh.run("tick 09:00\ntick 09:30\n"));
        // Ticks at any rate give the same time: timers complete at their due time.
        Scenario coarse = new Scenario(quiet, ctx);
        assertEquals(List.of("09:15 RAISED quiet-sensor/cows NaN"), coarse.run("tick 09:00\ntick 12:00\n"));
    }

    @Test
    void stuckRaisesWhenTheValueHasNotChangedOverTheWindow() {
        Scenario s = new Scenario("""
                watch stuck-rh
                  raise when stuck(cows.rh, 2h)
                  clear when not stuck(cows.rh, 2h)
                  notify office
                """, Scenario.farm());
        assertEquals(List.of("10:00 RAISED stuck-rh/cows 85.0", "11:00 CLEARED stuck-rh/cows 84.0"), s.run(
                series("cows", "rh", "08:00", "10:50", 10, "85") + series("cows", "rh", "11:00", "12:00", 10, "84", "86")));
    }

    @Test
    void onlyBetweenWrapsMidnightAndARaisedAlertClearsNormallyOutsideIt() {
        String chill = """
                watch calf-chill
                  raise when @calves.wind-chill < 5 C for 20m
                  clear when @calves.wind-chill > 7 C for 15m
                  level critical
                  notify night-phone, barn-siren
                  only between 18:00 and 08:00
                """;
        Scenario s = new Scenario(chill, Scenario.farm());
        assertEquals(List.of("18:20 RAISED calf-chill/calf-pen-1 2.0", "2026-01-16 10:15 CLEARED calf-chill/calf-pen-1 9.0"), s.run(
                series("calf-pen-1", "wind-chill", "16:00", "+1 09:59", 5, "2") + series("calf-pen-1", "wind-chill", "+1 10:00", "+1 10:30", 5, "9")));
        // Cold from 07:50: holding, but the window closes at 08:00 before the hold completes.
        Scenario morning = new Scenario(chill, Scenario.farm());
        assertEquals(List.of(), morning.run(series("calf-pen-1", "wind-chill", "07:50", "09:00", 5, "2")));
    }

    @Test
    void onlyBetweenFollowsSiteWallClockAcrossDaylightSavingChanges() {
        String early = """
                watch early
                  raise when cows.thi > 80 for 10m
                  clear when cows.thi < 78
                  notify office
                  only between 18:00 and 08:00
                """;
        ZoneId london = ZoneId.of("Europe/London");
        // 2026-03-29: clocks go forward at 01:00 UTC; 07:05 UTC is 08:05 BST, outside the window.
        Scenario spring = new Scenario(early, Scenario.farm(), london, WatchEngine.Options.replay());
        assertEquals(List.of(), spring.run(series("cows", "thi", "2026-03-29T07:05:00Z", "2026-03-29T07:30:00Z", 1, "85")));
        // The day before (GMT), 07:05 UTC is 07:05 local, inside.
        Scenario before = new Scenario(early, Scenario.farm(), london, WatchEngine.Options.replay());
        assertEquals(List.of("2026-03-28 07:15 RAISED early/cows 85.0"),
                before.run(series("cows", "thi", "2026-03-28T07:05:00Z", "2026-03-28T07:30:00Z", 1, "85")));
        // 2026-10-25: clocks go back at 01:00 UTC; 07:30 UTC is 07:30 GMT, inside (it was 08:30 BST the day before).
        Scenario autumn = new Scenario(early, Scenario.farm(), london, WatchEngine.Options.replay());
        assertEquals(List.of("2026-10-25 07:40 RAISED early/cows 85.0"),
                autumn.run(series("cows", "thi", "2026-10-25T07:30:00Z", "2026-10-25T07:50:00Z", 1, "85")));
        Scenario dayBefore = new Scenario(early, Scenario.farm(), london, WatchEngine.Options.replay());
        assertEquals(List.of(), dayBefore.run(series("cows", "thi", "2026-10-24T07:30:00Z", "2026-10-24T07:50:00Z", 1, "85")));
    }

    @Test
    void oneIndependentInstancePerZone() {
        Scenario s = new Scenario("""
                watch calf-chill
                  raise when @calves.wind-chill < 5 C for 20m
                  clear when @calves.wind-chill > 7 C for 15m
                  notify night-phone
                """, Scenario.farm());
        assertEquals(List.of("10:20 RAISED calf-chill/calf-pen-1 2.0", "11:20 RAISED calf-chill/calf-pen-2 3.0",
                        "12:15 CLEARED calf-chill/calf-pen-1 8.0"),
                s.run(merge(series("calf-pen-1", "wind-chill", "10:00", "11:59", 5, "2"), series("calf-pen-2", "wind-chill", "11:00", "12:30", 5, "3"),
                        series("calf-pen-1", "wind-chill", "12:00", "12:30", 5, "8"))));
        assertEquals(AlertState.RAISED, s.engine.state("calf-chill", "calf-pen-2"));
        assertEquals(AlertState.CLEAR, s.engine.state("calf-chill", "calf-pen-1"));
    }

    @Test
    void messagesAreRenderedWithOneDecimalAndTheSiteTime() {
        Scenario s = new Scenario(HEAT + """
                watch cold
                  raise when cows.dry-bulb < 0 C
                  clear when cows.dry-bulb > 2 C
                  notify office
                  message "{watch} at {site}: {zone} {quantity} {value} {unit} ({level}) since {since}"
                """, Scenario.farm());
        List<Transition> ts = new ArrayList<>();
        for (int m = 0; m <= 30; m++) ts.addAll(s.engine.accept(new ZoneReading(Scenario.time("10:00").plusSeconds(60L * m), "cows", Quantity.THI, 73.44)));
        ts.addAll(s.engine.accept(new ZoneReading(Scenario.time("10:31"), "cows", Quantity.DRY_BULB, -0.04)));
        ts.addAll(s.engine.accept(new ZoneReading(Scenario.time("10:32"), "cows", Quantity.DRY_BULB, 2.5)));
        assertEquals("Heat stress in cows: THI 73.4. Check fans and water.", ts.get(0).message());
        assertEquals("", ts.get(0).unit());
        assertEquals("cold at larkmoor: cows dry-bulb 0.0 C (warning) since 2026-01-15 10:31", ts.get(1).message());
        // The all-clear never repeats the raise's advice: without a 'clear message' its text is left to the alert stage.
        assertEquals("", ts.get(2).message());
        assertEquals(Transition.Kind.CLEARED, ts.get(2).kind());
        assertEquals(Scenario.time("10:31"), ts.get(2).since());
    }

    @Test
    void aClearMessageIsFilledWithTheValueNowAndAWatchWithoutMessageLeavesTheRaiseTextEmpty() {
        Scenario s = new Scenario("""
                watch cold
                  raise when cows.dry-bulb < 0 C
                  clear when cows.dry-bulb > 2 C
                  notify office
                  clear message "{zone} is back to {value} {unit}; jackets can come off at {site}."
                """, Scenario.farm());
        List<Transition> ts = new ArrayList<>();
        ts.addAll(s.engine.accept(new ZoneReading(Scenario.time("10:31"), "cows", Quantity.DRY_BULB, -0.04)));
        ts.addAll(s.engine.accept(new ZoneReading(Scenario.time("10:32"), "cows", Quantity.DRY_BULB, 2.54)));
        assertEquals("", ts.get(0).message(), "no message line: the alert stage writes the raise");
        assertEquals("cows is back to 2.5 C; jackets can come off at larkmoor.", ts.get(1).message());
    }

    @Test
    void aSnapshotSavedWithThePendingStateOfEarlierVersionsRestoresAsHolding() {
        Scenario b = new Scenario(HEAT, Scenario.farm());
        assertEquals(List.of(), b.engine.restore(Map.of("heat/cows", "PENDING since=2026-01-15T10:00:00Z value=73.0")));
        assertEquals(AlertState.HOLDING, b.engine.state("heat", "cows"));
        assertTrue(b.engine.snapshot().get("heat/cows").startsWith("HOLDING since="), b.engine.snapshot().toString());
        // the hold restarts at the first evaluation after the restart, as for any restored hold
        assertEquals(List.of("10:50 RAISED heat/cows 73.0"), b.run(series("cows", "thi", "10:20", "10:50", 1, "73")));
    }

    @Test
    void snapshotAndRestoreInEveryState() {
        String script = series("cows", "thi", "10:00", "10:59", 1, "73") + series("cows", "thi", "11:00", "11:40", 1, "69");
        List<String> straight = new Scenario(HEAT, Scenario.farm()).run(script);
        assertEquals(List.of("10:30 RAISED heat/cows 73.0", "11:20 CLEARED heat/cows 69.0"), straight);
        String[] lines = script.split("\n");
        // Restart after each reading: the events are those of the straight run, except that a hold running at the
        // restart starts again at the first evaluation after it (the time in between was not observed).
        for (int cut = 1; cut < lines.length; cut++) {
            Scenario a = new Scenario(HEAT, Scenario.farm());
            List<String> out = new ArrayList<>(a.run(String.join("\n", java.util.Arrays.copyOfRange(lines, 0, cut))));
            AlertState before = a.engine.state("heat", "cows");
            Map<String, String> snap = a.engine.snapshot();
            Scenario b = new Scenario(HEAT, Scenario.farm());
            assertEquals(List.of(), b.engine.restore(snap));
            assertEquals(before, b.engine.state("heat", "cows"), "state survives at cut " + cut);
            out.addAll(b.run(String.join("\n", java.util.Arrays.copyOfRange(lines, cut, lines.length))));
            long raised = out.stream().filter(l -> l.contains("RAISED")).count();
            long cleared = out.stream().filter(l -> l.contains("CLEARED")).count();
            assertEquals(1, raised, "exactly one raised event at cut " + cut + ": " + out);
            assertEquals(1, cleared, "exactly one cleared event at cut " + cut + ": " + out);
            if (before == AlertState.CLEAR || before == AlertState.RAISED) {
                assertEquals(straight, out, "a restart with no hold running changes nothing (cut " + cut + ")");
            } else {
                assertTrue(!out.equals(straight), "a hold running at the restart starts again (cut " + cut + ")");
            }
        }
        // A restored raised alert reports its original episode start when it clears.
        Scenario a = new Scenario(HEAT, Scenario.farm());
        a.run(series("cows", "thi", "10:00", "10:45", 1, "73"));
        Scenario b = new Scenario(HEAT, Scenario.farm());
        b.engine.restore(a.engine.snapshot());
        List<Transition> ts = new ArrayList<>();
        for (int m = 0; m <= 30; m++) ts.addAll(b.engine.accept(new ZoneReading(Scenario.time("12:00").plusSeconds(60L * m), "cows", Quantity.THI, 69)));
        assertEquals(1, ts.size());
        assertEquals(Scenario.time("10:00"), ts.get(0).since());
        assertEquals(Scenario.time("12:20"), ts.get(0).at());
        // Bad or stale snapshot entries are reported, not thrown.
        Scenario c = new Scenario(HEAT, Scenario.farm());
        assertEquals(List.of("gone/cows: no such watch instance in the current rules; skipped",
                        "heat/cows: cannot read 'RAISED since=yesterday' (Text 'yesterday' could not be parsed at index 0); skipped"),
                c.engine.restore(new java.util.LinkedHashMap<>(Map.of("gone/cows", "RAISED since=2026-01-15T10:00:00Z")) {{
                    put("heat/cows", "RAISED since=yesterday");
                }}));
    }

    @Test
    void clockJumpsNeitherFireNorResetHoldTimersInLiveMode() {
        String ticks = "";
        Scenario fwd = new Scenario(HEAT, Scenario.farm(), ZoneId.of("UTC"), WatchEngine.Options.live());
        List<String> out = fwd.run(series("cows", "thi", "10:00", "10:10", 1, "73") + series("cows", "thi", "13:11", "13:40", 1, "73"));
        // 30m hold: 10 minutes before the jump, 20 after it; the step 10:10 -> 13:11 counts as no time at all.
        assertEquals(List.of("13:31 RAISED heat/cows 73.0"), out);
        assertEquals(1, fwd.engine.clockJumps());
        Scenario back = new Scenario(HEAT, Scenario.farm(), ZoneId.of("UTC"), WatchEngine.Options.live());
        assertEquals(List.of("07:30 RAISED heat/cows 73.0"),
                back.run(series("cows", "thi", "10:00", "10:10", 1, "73") + "tick 07:10\n" + series("cows", "thi", "07:11", "07:40", 1, "73")));
        // A forward jump does not make every stream look silent.
        String quiet = "watch quiet\n raise when silent(cows.dry-bulb) for 1m\n notify office\n";
        SimpleRuleContext ctx = Scenario.farm().defaultMaxAge(Duration.ofMinutes(5));
        Scenario live = new Scenario(quiet, ctx, ZoneId.of("UTC"), WatchEngine.Options.live());
        assertEquals(List.of(), live.run(series("cows", "dry-bulb", "10:00", "10:10", 1, "20") + "tick 14:10:30\n"
                + series("cows", "dry-bulb", "14:11", "14:30", 1, "20")));
        // In replay every gap is real time: the same input is a silent sensor.
        Scenario replay = new Scenario(quiet, ctx);
        assertEquals(List.of("10:16 RAISED quiet/cows 20.0", "14:12 CLEARED quiet/cows 20.0"), replay.run(series("cows", "dry-bulb", "10:00", "10:10", 1, "20")
                + "tick 14:10:30\n" + series("cows", "dry-bulb", "14:11", "14:30", 1, "20")));
        assertTrue(ticks.isEmpty());
    }
}
