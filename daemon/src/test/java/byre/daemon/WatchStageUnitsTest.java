package byre.daemon;

import static org.junit.jupiter.api.Assertions.assertEquals;

import byre.history.HistoryStore;
import byre.rules.RuleCompiler;
import byre.rules.RuleSet;
import byre.rules.RuleSource;
import byre.rules.SimpleRuleContext;
import byre.rules.Watch;
import byre.rules.ZoneReading;
import byre.rules.eval.AlertState;
import byre.rules.eval.Transition;
import byre.units.Quantity;
import java.nio.file.Path;
import java.time.Instant;
import java.time.ZoneId;
import java.util.ArrayList;
import java.util.List;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/**
 * The live rule stage fills {value} in the site's units, as the header of every message shows them, and reads the
 * watch state saved by earlier versions.
 */
class WatchStageUnitsTest {
    static final Instant T0 = Instant.parse("2026-01-15T02:00:00Z");

    @TempDir
    Path dir;

    static RuleSet rules() {
        return RuleCompiler.compile(List.of(new RuleSource("cold.rules", """
                watch calf-cold
                  raise when calf-pen-1.dry-bulb < 10 C
                  clear when calf-pen-1.dry-bulb > 12 C
                  notify office
                  message "Calf pen at {value} {unit}."
                """)), new SimpleRuleContext().site("larkmoor").zone("calf-pen-1").channel("office")).ruleSet().orElseThrow();
    }

    List<String> messages(boolean us) {
        RuleSet rules = rules();
        List<String> out = new ArrayList<>();
        try (HistoryStore store = HistoryStore.open(dir.resolve(us + ".db"))) {
            WatchStage stage = new WatchStage(rules, store, ZoneId.of("UTC"), (Transition t, Watch w) -> out.add(t.message()), T0, us);
            stage.accept(new ZoneReading(T0, "calf-pen-1", Quantity.DRY_BULB, 8.04));
        }
        return out;
    }

    @Test
    void usUnitsShowFahrenheit() {
        assertEquals(List.of("Calf pen at 8.0 C."), messages(false));
        // 8.04 C = 46.47 F (F = C * 9/5 + 32, common practice)
        assertEquals(List.of("Calf pen at 46.5 F."), messages(true));
    }

    @Test
    void aHoldSavedAsPendingByAnEarlierVersionIsKeptAsHolding() {
        try (HistoryStore store = HistoryStore.open(dir.resolve("upgrade.db"))) {
            store.putState(WatchStage.STATE_KEY, "calf-cold/calf-pen-1\tPENDING since=2026-01-15T01:50:00Z value=9.2\n");
            WatchStage stage = new WatchStage(rules(), store, ZoneId.of("UTC"), (Transition t, Watch w) -> { }, T0, false);
            assertEquals(AlertState.HOLDING, stage.engine().state("calf-cold", "calf-pen-1"));
        }
    }
}
