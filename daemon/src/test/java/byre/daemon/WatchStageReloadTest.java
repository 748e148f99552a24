package byre.daemon;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;

import byre.history.HistoryStore;
import byre.rules.CompileResult;
import byre.rules.RuleCompiler;
import byre.rules.RuleSet;
import byre.rules.RuleSource;
import byre.rules.SimpleRuleContext;
import byre.rules.Watch;
import byre.rules.ZoneReading;
import byre.rules.eval.Transition;
import byre.units.Quantity;
import java.nio.file.Path;
import java.time.Duration;
import java.time.Instant;
import java.time.ZoneId;
import java.util.ArrayList;
import java.util.List;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/** A reload of edited rule files keeps what an unchanged watch was doing: its state, its running hold, its windows. */
class WatchStageReloadTest {
    @TempDir
    Path dir;

    static final Instant T0 = Instant.parse("2026-07-14T10:00:00Z");

    static final String HEAT = """
            watch heat
              raise when cows.thi >= 75 for 2m
              clear when cows.thi <= 73 for 2m
              notify office
            """;

    static final String MEAN = """
            watch mean-heat
              raise when avg(cows.thi, 10m) >= 74
              clear when avg(cows.thi, 10m) <= 72
              notify office
            """;

    static RuleSet compile(String text) {
        SimpleRuleContext ctx = new SimpleRuleContext().site("larkmoor").zone("cows", "cattle").channel("office")
                .defaultMaxAge(Duration.ofMinutes(5));
        CompileResult r = RuleCompiler.compile(List.of(new RuleSource("heat.rules", text)), ctx);
        assertFalse(r.hasErrors(), r::render);
        return r.ruleSet().orElseThrow();
    }

    final List<String> events = new ArrayList<>();

    WatchStage stage(HistoryStore store, String rules) {
        return new WatchStage(compile(rules), store, ZoneId.of("UTC"), new WatchStage.Outcomes() {
            @Override
            public void transition(Transition t, Watch watch) {
                events.add(t.at() + " " + t.kind() + " " + t.watch());
            }
        }, T0);
    }

    void reading(WatchStage s, int seconds, double thi) {
        s.accept(new ZoneReading(T0.plusSeconds(seconds), "cows", Quantity.THI, thi));
    }

    @Test
    void aRunningHoldOfAnUnchangedWatchRunsOnAcrossAReload() {
        try (HistoryStore store = HistoryStore.open(dir.resolve("history.db"))) {
            WatchStage s = stage(store, HEAT);
            reading(s, 0, 76); // pending from 10:00, due 10:02
            reading(s, 60, 76);
            // Another file gains a watch: heat itself is unchanged (it only moved down in the file).
            s.reload(compile(MEAN + "\n" + HEAT), T0.plusSeconds(90));
            s.tick(T0.plusSeconds(119));
            assertEquals(List.of(), events);
            s.tick(T0.plusSeconds(121));
            assertEquals(List.of("2026-07-14T10:02:00Z RAISED heat"), events, "raised when its 2-minute hold was due, not 2 minutes after the reload");
        }
    }

    @Test
    void windowsOfAnUnchangedFunctionKeepTheirLiveReadings() {
        try (HistoryStore store = HistoryStore.open(dir.resolve("history.db"))) {
            WatchStage s = stage(store, MEAN);
            // Readings that never reached the history (nothing writes it here): only the live window holds them.
            for (int m = 0; m < 9; m++) reading(s, 60 * m, 70);
            s.reload(compile(HEAT + "\n" + MEAN), T0.plusSeconds(9 * 60));
            reading(s, 9 * 60, 80); // mean of nine 70s and one 80: 71, not 80 from an emptied window
            assertEquals(List.of(), events);
            assertEquals(1, s.engine().carriedInstances());
        }
    }

    @Test
    void aChangedWatchKeepsItsStateButStartsItsHoldAgain() {
        try (HistoryStore store = HistoryStore.open(dir.resolve("history.db"))) {
            WatchStage s = stage(store, HEAT);
            for (int m = 0; m <= 3; m++) reading(s, 60 * m, 76);
            assertEquals(List.of("2026-07-14T10:02:00Z RAISED heat"), events);
            reading(s, 240, 72); // clearing from 10:04
            s.reload(compile(HEAT.replace("<= 73 for 2m", "<= 73 for 3m")), T0.plusSeconds(270));
            assertEquals(byre.rules.eval.AlertState.CLEARING.name(), s.engine().snapshot().get("heat/cows").split(" ")[0],
                    "a changed watch is restored from its saved state; its clear hold starts again");
            assertEquals(0, s.engine().carriedInstances());
            reading(s, 300, 72);
            reading(s, 360, 72);
            reading(s, 420, 72);
            reading(s, 480, 72);
            assertEquals("2026-07-14T10:08:00Z CLEARED heat", events.get(events.size() - 1), "3 minutes from the first reading after the reload");
        }
    }
}
