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

/** Where a reading stops counting, and what a silence is "since". */
class FreshnessTest {
    static final String HEAT = """
            watch heat
              raise when cows.thi >= 75 for 30m
              clear when cows.thi <= 73 for 30m
              notify office
            """;

    @Test
    void aSensorReportingExactlyEveryMaxAgeNeverLooksStale() {
        // A battery sensor every 5 minutes and max-age 5m: the hold timer falls due at 10:30, the very
        // instant the 10:25 reading is 5 minutes old. That reading still counts, so the watch raises.
        Scenario s = new Scenario(HEAT, Scenario.farm().defaultMaxAge(Duration.ofMinutes(5)));
        assertEquals(List.of("10:30 RAISED heat/cows 76.0"), s.run(ScenarioTest.series("cows", "thi", "10:00", "11:00", 5, "76")));
    }

    @Test
    void theLimitIsExactlyMaxAge() {
        String w = "watch heat\n  raise when cows.thi >= 75 for %s\n  notify office\n";
        // The 5-minute hold falls due at 10:05, when the 10:00 reading is exactly max-age old: raised.
        Scenario exact = new Scenario(w.formatted("5m"), Scenario.farm().defaultMaxAge(Duration.ofMinutes(5)));
        assertEquals(List.of("10:05 RAISED heat/cows 76.0"), exact.run("10:00 cows thi 76\ntick 10:20\n"));
        // One millisecond later it is no data: a hold of 5m + 1 ms falls back instead of raising.
        Scenario over = new Scenario(w.formatted("5m"), Scenario.farm().defaultMaxAge(Duration.ofMinutes(5).minusMillis(1)));
        assertEquals(List.of(), over.run("10:00 cows thi 76\ntick 10:20\n"));
        assertEquals(byre.rules.eval.AlertState.CLEAR, over.engine.state("heat", "cows"));
    }

    @Test
    void aSilenceIsSinceTheLastReading() {
        String quiet = """
                watch quiet-anemometer
                  raise when silent(cows.air-speed) for 10m
                  notify office
                  message "No air-speed reading from {zone} since {since}."
                """;
        CompileResult r = RuleCompiler.compile(List.of(new RuleSource("q.rules", quiet)), Scenario.farm().defaultMaxAge(Duration.ofMinutes(5)));
        WatchEngine e = new WatchEngine(r.ruleSet().orElseThrow(), ZoneId.of("UTC"));
        List<Transition> out = new ArrayList<>();
        for (int m = 0; m <= 59; m++) {
            out.addAll(e.accept(new ZoneReading(Instant.parse(Scenario.DAY + "T11:00:00Z").plusSeconds(60L * m), "cows", Quantity.AIR_SPEED, 1.2)));
        }
        out.addAll(e.tick(Instant.parse(Scenario.DAY + "T12:30:00Z")));
        assertEquals(1, out.size(), out::toString);
        Transition t = out.get(0);
        // Last reading 11:59; silent from 12:04 (max-age 5m); raised 10 minutes later, since the last reading.
        assertEquals(Instant.parse(Scenario.DAY + "T12:14:00Z"), t.at());
        assertEquals(Instant.parse(Scenario.DAY + "T11:59:00Z"), t.since());
        assertEquals("No air-speed reading from cows since 2026-01-15 11:59.", t.message());
    }
}
