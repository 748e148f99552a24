package byre.rules;

import static org.junit.jupiter.api.Assertions.assertEquals;

import byre.rules.eval.Transition;
import byre.rules.eval.WatchEngine;
import byre.units.Quantity;
import java.time.Duration;
import java.time.Instant;
import java.time.ZoneId;
import java.util.ArrayList;
import java.util.List;
import org.junit.jupiter.api.Test;

/**
 * The clock of a Pi without a real-time clock can jump by a year when NTP corrects it (or is
 * misconfigured): a jump of +1 year or -1 year must neither fire nor clear a hold timer.
 */
class ClockJumpYearTest {
    static final Instant T0 = Instant.parse("2026-07-14T10:00:00Z");

    final WatchEngine engine = new WatchEngine(
            RuleCompiler.compile(List.of(new RuleSource("heat.rules", ScenarioTest.HEAT)), Scenario.farm()).ruleSet().orElseThrow(),
            ZoneId.of("UTC"), WatchEngine.Options.live());
    final List<String> events = new ArrayList<>();

    void thi(Instant from, int minutes, double value) {
        for (int m = 0; m < minutes; m++) {
            Instant t = from.plusSeconds(60L * m);
            for (Transition tr : engine.tick(t)) events.add(tr.kind() + " " + Duration.between(from, tr.at()).toMinutes());
            for (Transition tr : engine.accept(new ZoneReading(t, "cows", Quantity.THI, value))) {
                events.add(tr.kind() + " " + Duration.between(from, tr.at()).toMinutes());
            }
        }
    }

    @Test
    void aYearForwardNeitherCompletesAHoldingRaiseNorAClear() {
        thi(T0, 10, 73);                                  // holding for 10 of its 30 minutes
        Instant later = T0.plus(Duration.ofDays(365));
        assertEquals(List.of(), engine.tick(later), "the jump itself must not complete the 30-minute hold");
        thi(later, 25, 73);
        // 10 minutes before the jump + 20 after it (one minute is lost with the jump).
        assertEquals(List.of("RAISED 21"), events);
        events.clear();
        thi(later.plusSeconds(25 * 60), 10, 60);          // clearing for 10 of its 20 minutes
        Instant evenLater = later.plus(Duration.ofDays(365));
        assertEquals(List.of(), engine.tick(evenLater), "a jump must not complete the clear hold either");
        assertEquals(List.of(), events);
        assertEquals(2, engine.clockJumps());
    }

    @Test
    void aYearBackNeitherFiresNorClears() {
        thi(T0, 40, 73);                                  // raised after 30 minutes
        assertEquals(List.of("RAISED 30"), events);
        events.clear();
        thi(T0.plusSeconds(40 * 60), 10, 60);             // clearing for 10 of its 20 minutes
        Instant earlier = T0.minus(Duration.ofDays(365));
        assertEquals(List.of(), engine.tick(earlier), "a jump back must not clear");
        thi(earlier, 5, 60);
        assertEquals(List.of(), events, "the clear hold does not complete early after the jump back");
        thi(earlier.plusSeconds(5 * 60), 10, 60);
        assertEquals(1, events.size(), events.toString());
        assertEquals("CLEARED", events.get(0).split(" ")[0]);
    }
}
