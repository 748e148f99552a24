package byre.rules;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNull;

import byre.rules.eval.Transition;
import byre.rules.eval.WatchEngine;
import byre.units.Quantity;
import java.time.Duration;
import java.time.Instant;
import java.time.ZoneId;
import java.util.List;
import org.junit.jupiter.api.Test;

/**
 * The engine names the time of its next hold timer or silence check, so that the live daemon ticks it only then (and
 * once a minute, so that a live engine does not take the time passed for a corrected clock): ticked at exactly that
 * time it acts, and not a moment before.
 */
class NextDueTest {
    static final Instant T0 = Instant.parse("2026-07-14T10:00:00Z");

    static WatchEngine engine(String rules) {
        return new WatchEngine(RuleCompiler.compile(List.of(new RuleSource("t.rules", rules)), Scenario.farm()).ruleSet().orElseThrow(),
                ZoneId.of("UTC"), WatchEngine.Options.live());
    }

    static ZoneReading thi(Instant at, double v) {
        return new ZoneReading(at, "cows", Quantity.THI, v);
    }

    /** Ticks once a minute from {@code from} until before {@code due}, as the daemon does at the least; nothing may happen. */
    static void quietUntil(WatchEngine e, Instant from, Instant due) {
        for (Instant t = from; t.isBefore(due); t = t.plusSeconds(60)) assertEquals(List.of(), e.tick(t), "at " + t);
        assertEquals(List.of(), e.tick(due.minusMillis(1)), "a moment before it is due");
    }

    static List<String> kinds(List<Transition> ts) {
        return ts.stream().map(t -> t.kind() + " " + t.watch() + " " + t.at()).toList();
    }

    @Test
    void aHoldIsDueWhenItEndsAndNotBefore() {
        WatchEngine e = engine(ScenarioTest.HEAT); // raise when cows.thi >= 72 for 30m; clear when <= 70 for 20m
        e.tick(T0);
        assertNull(e.nextDue(), "nothing holding, no silence watched");
        e.accept(thi(T0.plusSeconds(10), 73));
        assertEquals(T0.plusSeconds(10).plus(Duration.ofMinutes(30)), e.nextDue());
        quietUntil(e, T0.plusSeconds(10), T0.plusSeconds(1810));
        assertEquals(List.of("RAISED heat " + T0.plusSeconds(1810)), kinds(e.tick(T0.plusSeconds(1810))));
        assertNull(e.nextDue(), "raised: nothing to time until the clear condition holds");
        e.accept(thi(T0.plusSeconds(1900), 69));
        assertEquals(T0.plusSeconds(1900).plus(Duration.ofMinutes(20)), e.nextDue(), "the clear hold");
        e.accept(thi(T0.plusSeconds(1960), 71));
        assertNull(e.nextDue(), "the clear hold broke off: its timer no longer counts");
    }

    @Test
    void silenceIsDueAtTheStreamsMaxAge() {
        WatchEngine e = engine("""
                watch quiet
                  raise when silent(cows.thi)
                  notify office
                """);
        e.tick(T0);
        assertEquals(T0.plus(Duration.ofMinutes(30)), e.nextDue(), "before the first reading, counted from the start");
        e.accept(thi(T0.plusSeconds(60), 70));
        Instant silentAt = T0.plusSeconds(60).plus(Duration.ofMinutes(30));
        assertEquals(silentAt, e.nextDue(), "the zone's max-age (30m here) after the last reading");
        quietUntil(e, T0.plusSeconds(60), silentAt);
        assertEquals(List.of("RAISED quiet " + silentAt), kinds(e.tick(silentAt)));
    }

    @Test
    void aCorrectedClockMovesTheDueTimeWithIt() {
        WatchEngine e = engine(ScenarioTest.HEAT);
        e.accept(thi(T0, 73));
        e.tick(T0.plusSeconds(60));
        // NTP sets the clock an hour forward: the engine's time stands still across the jump, so the hold ends an hour
        // later on the new clock, and that is when it asks to be ticked.
        Instant jumped = T0.plusSeconds(60).plus(Duration.ofHours(1));
        assertEquals(List.of(), e.tick(jumped));
        assertEquals(T0.plus(Duration.ofMinutes(30)).plus(Duration.ofHours(1)), e.nextDue());
    }
}
